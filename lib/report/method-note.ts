/**
 * The report's method note, written once for every surface (web report, shared page, PDF, mail): where each
 * family's radial tolerance comes from (its fit-table row, pin and hole, or the pattern; lib/geometry/fits.ts),
 * whether the fit tables' rows were checked against published copies or are from memory, and how the
 * uncertainty bands are drawn (lib/geometry/band.ts). Lengths arrive in mm and are written in the reader's unit.
 */
import type { FitSpec } from '@/lib/geometry/contract';
import { BAND_NOTE } from '@/lib/geometry/band';
import { fitSourceNote, fitTablesNote } from '@/lib/geometry/fits';
import { familyWord } from '@/lib/geometry/labels';
import type { PatternMm } from '@/lib/geometry/units';
import { formatLength, type LengthUnit } from './units';

/** A family as the method note names it: its word, what fits its holes and its hole diameter (mm). */
export interface FitFamily {
  name: string;
  fit: FitSpec;
  holeDiameterMm: number;
}

/** The families of a pattern in mm (patternToMm) as the method note needs them; null when the pattern is gone. */
export function fitFamilies(pattern: Pick<PatternMm, 'families'> | null | undefined): FitFamily[] | null {
  return pattern ? pattern.families.map((f) => ({ name: familyWord(f), fit: f.fit, holeDiameterMm: f.holeDiameter })) : null;
}

export interface MethodNoteText {
  heading: string;
  /** One sentence per family; null when the pattern the check was measured against is gone (`gone` says so). */
  families: string[] | null;
  gone: string | null;
  /** The fit tables' provenance and the band's definition, one paragraph. */
  note: string;
}

/** The heading every surface gives the note. */
export const METHOD_NOTE_HEADING = 'How the tolerances were set';

/** The method note for a check whose pattern has these families (null: the pattern is gone), lengths in `unit`. */
export function methodNote(families: readonly FitFamily[] | null, unit: LengthUnit): MethodNoteText {
  const length = (mm: number) => formatLength(mm, unit);
  return {
    heading: METHOD_NOTE_HEADING,
    families: families ? families.map((f) => fitSourceNote(f.name, f.fit, f.holeDiameterMm, length)) : null,
    gone: families ? null : 'The pattern this check was measured against is no longer available.',
    note: `${fitTablesNote()} ${BAND_NOTE}`,
  };
}

/** The note as plain lines after its heading (PDF, the mail's text part): each family's sentence, then the note. */
export function methodNoteLines(m: MethodNoteText): string[] {
  return [...(m.families ?? (m.gone ? [m.gone] : [])), m.note];
}
