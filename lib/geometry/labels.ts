/**
 * Position labels: a family's column letters (A, B, …, Z, AA, AB, …) counted from its origin along +X, and row
 * numbers (1, 2, …) along +Y, so col 2 row 6 of the inserts reads `insert C7`.
 */
import type { HoleKind } from './contract';

/** Column index (0-based) → letters: 0 → A, 25 → Z, 26 → AA (bijective base 26). */
export function columnLetters(col: number): string {
  if (!Number.isInteger(col) || col < 0) throw new RangeError(`column index must be a whole number ≥ 0, got ${col}`);
  let n = col + 1;
  let s = '';
  while (n > 0) {
    const r = (n - 1) % 26;
    s = String.fromCharCode(65 + r) + s;
    n = Math.floor((n - 1) / 26);
  }
  return s;
}

/** Letters → column index (inverse of `columnLetters`). */
export function columnIndex(letters: string): number {
  if (!/^[A-Z]+$/.test(letters)) throw new RangeError(`not column letters: "${letters}"`);
  let n = 0;
  for (const ch of letters) n = n * 26 + (ch.charCodeAt(0) - 64);
  return n - 1;
}

const KIND_WORD: Record<HoleKind, string> = { 'threaded-insert': 'insert', 'dog-hole': 'dog', 'pin-hole': 'pin', other: 'hole' };

/** The name of each kind of hole, as the bed's pages and its editor write it. */
export const HOLE_KIND_NAME: Record<HoleKind, string> = { 'threaded-insert': 'Threaded insert', 'dog-hole': 'Dog hole', 'pin-hole': 'Pin hole', other: 'Other hole' };

/** The word used for a family in labels: its own `label` or one from its kind. */
export function familyWord(f: { kind: HoleKind; label?: string }): string {
  return f.label ?? KIND_WORD[f.kind];
}

/** Cell name, e.g. (2, 6) → "C7". */
export const cellName = (col: number, row: number): string => `${columnLetters(col)}${row + 1}`;

/** Full label, e.g. `insert C7`. */
export function positionLabel(f: { kind: HoleKind; label?: string }, col: number, row: number): string {
  return `${familyWord(f)} ${cellName(col, row)}`;
}

/** Parses "C7" or "insert C7" into { word?, col, row } (0-based), or null. */
export function parseLabel(label: string): { word?: string; col: number; row: number } | null {
  const m = /^(?:(.+?)\s+)?([A-Z]+)(\d+)$/.exec(label.trim());
  if (!m) return null;
  const row = Number(m[3]) - 1;
  if (row < 0) return null;
  return { word: m[1], col: columnIndex(m[2]!), row };
}
