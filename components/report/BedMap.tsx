'use client';
/**
 * A map of the bed seen from above with the front (operator side) at the bottom: bed frame mm (origin
 * front-left, +X right, +Y away from the operator) drawn with SVG y = height − Y. Each item is a mark at its
 * nominal place with an arrow for its displacement, multiplied by `exaggeration` so tenths of a mm show on a
 * metre-wide bed; the scale bar says what an arrow length means in real mm (or in).
 */
import { POSITION_MARKS } from '@/lib/report/palette';
import type { MapItem } from '@/lib/report/map-items';
import { formatLength, type LengthUnit } from '@/lib/report/units';
import { niceFactor } from '@/lib/report/map';
import { arrowScaleWords, MAP_EDGE_WORDS } from '@/lib/report/words';
import { MarkShape, markVar } from './Mark';

export interface MapPanel { id: string; x: number; y: number; width: number; height: number; note?: string }

export interface BedMapProps {
  widthMm: number;
  heightMm: number;
  originX: number;
  originY: number;
  panels: MapPanel[];
  items: MapItem[];
  /** Nearest spacing between positions, mm (the fingers' target size). */
  spacingMm: number;
  /** Radius of a mark, mm of bed (lib/report/map.ts markRadiusMm). */
  markRadiusMm: number;
  exaggeration: number;
  unit: LengthUnit;
  selected?: string | null;
  onSelect?: (key: string) => void;
  label: string;
}

export function BedMap(p: BedMapProps) {
  const margin = Math.max(p.widthMm, p.heightMm) * 0.04;
  const footer = Math.max(p.widthMm, p.heightMm) * 0.12;
  const W = p.widthMm + 2 * margin;
  const H = p.heightMm + 2 * margin + footer;
  const X = (x: number) => margin + (x - p.originX);
  const Y = (y: number) => margin + p.heightMm - (y - p.originY);
  const r = p.markRadiusMm;
  const font = Math.max(p.widthMm, p.heightMm) / 55;
  const line = Math.max(0.3, r * 0.28);
  // Scale bar: a deviation of `barMm` drawn as barMm × exaggeration, about a sixth of the bed's width.
  const barMm = niceFactor((p.widthMm / 6) / p.exaggeration);
  const barLen = barMm * p.exaggeration;
  const rulerMm = niceFactor(p.widthMm / 5);
  const fy = margin + p.heightMm + margin;
  return (
    <div className="@container">
    {/* the map keeps 36rem (its labels stay readable): where its box is narrower it scrolls, and says so */}
    <p className="mb-1 text-sm text-muted @min-[36rem]:hidden print:hidden" data-testid="map-scrolls">The map is wider than the screen: swipe it sideways to see the whole bed.</p>
    <div className="overflow-x-auto" data-testid="map-scroller">
    <svg viewBox={`0 0 ${W.toFixed(2)} ${H.toFixed(2)}`} role="img" aria-label={p.label} className="h-auto w-full min-w-[36rem] print:min-w-0" style={{ background: 'var(--map-ground)' }}>
      <defs>
        {[...POSITION_MARKS, 'unmatched' as const].map((m) => (
          <marker key={m} id={`gp-arrow-${m}`} viewBox="0 0 10 10" refX="8" refY="5" markerWidth="4" markerHeight="4" orient="auto-start-reverse">
            <path d="M 0 0 L 10 5 L 0 10 z" fill={markVar(m)} />
          </marker>
        ))}
      </defs>
      <rect x={X(p.originX)} y={Y(p.originY + p.heightMm)} width={p.widthMm} height={p.heightMm} fill="none" stroke="var(--ink)" strokeWidth={line * 1.5} />
      <text x={X(p.originX + p.widthMm / 2)} y={margin * 0.7} fontSize={font} textAnchor="middle" fill="var(--muted)">{MAP_EDGE_WORDS.back}</text>
      {p.panels.map((q) => (
        <rect key={q.id} x={X(q.x)} y={Y(q.y + q.height)} width={q.width} height={q.height} fill="none" stroke="var(--map-panel)" strokeWidth={line} strokeDasharray={`${line * 6} ${line * 3}`} />
      ))}
      {p.items.map((it) => {
        const cx = X(it.x), cy = Y(it.y);
        const sel = p.selected === it.key;
        const hasArrow = it.dx !== null && it.dy !== null && Math.hypot(it.dx, it.dy) * p.exaggeration > r * 0.6;
        return (
          <g key={it.key} onClick={p.onSelect ? () => p.onSelect!(it.key) : undefined} style={p.onSelect ? { cursor: 'pointer' } : undefined} data-label={it.label} data-mark={it.mark}>
            <title>{it.title}</title>
            {sel && <circle cx={cx} cy={cy} r={r * 2.2} fill="none" stroke="var(--focus)" strokeWidth={line * 1.6} />}
            {hasArrow && (
              <line x1={cx} y1={cy} x2={cx + it.dx! * p.exaggeration} y2={cy - it.dy! * p.exaggeration} stroke={markVar(it.mark)} strokeWidth={it.emphasis ? line * 2.2 : line * 1.2} markerEnd={`url(#gp-arrow-${it.mark})`} />
            )}
            <MarkShape mark={it.mark} x={cx} y={cy} r={it.emphasis ? r * 1.25 : r} />
            {/* a larger invisible target for fingers */}
            <circle cx={cx} cy={cy} r={Math.max(r * 2, p.spacingMm * 0.4)} fill="transparent" />
          </g>
        );
      })}
      {/* panel names and moves on one line in the panel's back-left corner, drawn over the marks (with a halo of the
          ground) so that a first row close to the panel's edge cannot hide them */}
      {p.panels.map((q) => (
        <text key={q.id} x={X(q.x) + font * 0.4} y={Y(q.y + q.height) + font * 1.1} fontSize={font * 0.9} fill="var(--map-panel)" stroke="var(--map-ground)" strokeWidth={font * 0.25} paintOrder="stroke" pointerEvents="none" data-panel={q.id}>
          <tspan fontWeight={700}>{q.id}</tspan>
          {q.note && <tspan fontSize={font * 0.75} dx={font * 0.5}>{q.note}</tspan>}
        </text>
      ))}
      <text x={X(p.originX + p.widthMm / 2)} y={fy - margin * 0.25} fontSize={font} textAnchor="middle" fill="var(--ink)" fontWeight={700}>{MAP_EDGE_WORDS.front}</text>
      <g transform={`translate(${margin} ${fy + footer * 0.35})`}>
        <line x1={0} y1={0} x2={barLen} y2={0} stroke="var(--ink)" strokeWidth={line * 2} markerEnd="url(#gp-arrow-in)" />
        <line x1={0} y1={-font * 0.4} x2={0} y2={font * 0.4} stroke="var(--ink)" strokeWidth={line * 2} />
        <text x={0} y={font * 1.5} fontSize={font} fill="var(--ink)">arrow = {formatLength(barMm, p.unit)} off · {arrowScaleWords(p.exaggeration)}</text>
      </g>
      <g transform={`translate(${W - margin - rulerMm} ${fy + footer * 0.35})`}>
        <rect x={0} y={-font * 0.25} width={rulerMm} height={font * 0.5} fill="var(--muted)" />
        <text x={rulerMm} y={font * 1.5} fontSize={font} fill="var(--ink)" textAnchor="end">{formatLength(rulerMm, p.unit, { decimals: p.unit === 'mm' ? 0 : 1 })} of bed</text>
      </g>
    </svg>
    </div>
    </div>
  );
}

/** Exaggerations offered beside the automatic choice (lib/report/map-scale.ts). */
export const EXAGGERATIONS = [10, 20, 50, 100, 200, 500, 1000, 2000] as const;
