/** One mark (shape and colour, lib/report/palette.ts), for the map, the photo, the legends and the verdict box. */
import { MARKS, markLayers, type Mark } from '@/lib/report/palette';

export const markVar = (m: Mark) => `var(--mark-${m})`;

/** The mark drawn at (x, y) with radius r inside an SVG; the ground colour is the CSS variable --map-ground. */
export function MarkShape({ mark, x, y, r }: { mark: Mark; x: number; y: number; r: number }) {
  const paint = (p: 'mark' | 'ground' | null) => (p === 'mark' ? markVar(mark) : p === 'ground' ? 'var(--map-ground)' : 'none');
  return (
    <g transform={`translate(${x} ${y})`} data-shape={MARKS[mark].shape}>
      {markLayers(mark, r).map((l, k) => <path key={k} d={l.d} fill={paint(l.fill)} stroke={l.stroke ? paint(l.stroke) : undefined} strokeWidth={l.stroke ? l.strokeWidth : undefined} />)}
    </g>
  );
}

/** The mark alone as a small inline picture (legends, table cells, verdict boxes). */
export function MarkIcon({ mark, size = 20 }: { mark: Mark; size?: number }) {
  return (
    <svg width={size} height={size} viewBox="-10 -10 20 20" aria-hidden="true" style={{ ['--map-ground' as string]: 'var(--card)' }}>
      <MarkShape mark={mark} x={0} y={0} r={6.5} />
    </svg>
  );
}

/** A small inline legend chip: the mark and its name. */
export function MarkChip({ mark, count }: { mark: Mark; count?: number }) {
  return (
    <span className="inline-flex items-center gap-1.5 whitespace-nowrap" data-mark={mark}>
      <MarkIcon mark={mark} />
      <span>{MARKS[mark].label}{count !== undefined ? ` ${count}` : ''}</span>
    </span>
  );
}
