/** One verdict mark (shape and colour, lib/report/palette.ts), for the map, the photo and the legends. */
import { MARKS, markPath, type Mark } from '@/lib/report/palette';

export const markVar = (m: Mark) => `var(--mark-${m})`;

/** The mark drawn at (x, y) with radius r inside an SVG. */
export function MarkShape({ mark, x, y, r, stroke }: { mark: Mark; x: number; y: number; r: number; stroke?: number }) {
  const s = MARKS[mark];
  const colour = markVar(mark);
  const w = stroke ?? Math.max(r * 0.35, 0.5);
  const d = markPath(s.shape, r);
  if (s.shape === 'crossed-square') {
    const e = r * 0.95;
    return (
      <g transform={`translate(${x} ${y})`}>
        <rect x={-e} y={-e} width={2 * e} height={2 * e} fill={colour} />
        <path d={`M ${-e * 0.6} ${-e * 0.6} L ${e * 0.6} ${e * 0.6} M ${e * 0.6} ${-e * 0.6} L ${-e * 0.6} ${e * 0.6}`} stroke="var(--map-ground)" strokeWidth={w} />
      </g>
    );
  }
  if (s.shape === 'ring' || s.shape === 'plus') return <path transform={`translate(${x} ${y})`} d={d} fill="none" stroke={colour} strokeWidth={w} />;
  return <path transform={`translate(${x} ${y})`} d={d} fill={colour} stroke="var(--map-ground)" strokeWidth={w * 0.4} />;
}

/** A small inline legend chip: the mark and its name. */
export function MarkChip({ mark, count }: { mark: Mark; count?: number }) {
  return (
    <span className="inline-flex items-center gap-1.5 whitespace-nowrap">
      <svg width="20" height="20" viewBox="-10 -10 20 20" aria-hidden="true" style={{ ['--map-ground' as string]: 'var(--card)' }}>
        <MarkShape mark={mark} x={0} y={0} r={6.5} stroke={2} />
      </svg>
      <span>{MARKS[mark].label}{count !== undefined ? ` ${count}` : ''}</span>
    </span>
  );
}
