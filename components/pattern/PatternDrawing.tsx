'use client';
/**
 * A live, to-scale drawing of a bed's pattern: the bed, its panels, its T-track channels and every hole, with
 * the mistakes of lib/patterns/lint.ts marked at once. The bed front (where the operator stands) is at the
 * bottom, because +Y runs away from the operator. Pointing at (or tapping) the drawing names the nearest
 * position and its centre in the pattern's units.
 *
 * Frames: the SVG's user space is the bed frame in the pattern's own units (mm or in), drawn with Y flipped
 * (svg y = bed height − Y) so the front-left origin is the bottom-left corner of the drawing.
 */
import { memo, useCallback, useMemo, useRef, useState, type PointerEvent, type ReactElement } from 'react';
import type { Pattern } from '@/lib/geometry/contract';
import { positionLabel } from '@/lib/geometry/labels';
import { holeKey, type LintResult } from '@/lib/patterns/lint';
import { MAP_EDGE_WORDS } from '@/lib/report/words';

type Pointed = { label: string; x: number; y: number; family: number; col: number; row: number; flagged: boolean };

const FAMILY_STROKES = ['var(--ink)', 'var(--accent)', 'var(--warn)', 'var(--idle)'];

const fmt = (v: number, units: 'mm' | 'in') => (units === 'in' ? +v.toFixed(3) : +v.toFixed(1));

/** The holes, memoised separately so pointing does not redraw thousands of circles. */
const Holes = memo(function Holes({ pattern, flagged }: { pattern: Pattern; flagged: Set<string> }) {
  const H = pattern.bed.height;
  const out: ReactElement[] = [];
  pattern.families.forEach((f, fi) => {
    const r = f.holeDiameter / 2;
    const stroke = FAMILY_STROKES[fi % FAMILY_STROKES.length];
    for (let row = 0; row < f.count.y; row++)
      for (let col = 0; col < f.count.x; col++) {
        const cx = f.origin.x + col * f.pitch.x, cy = H - (f.origin.y + row * f.pitch.y);
        const bad = flagged.has(holeKey(fi, col, row));
        out.push(
          <circle key={`${fi}:${col}:${row}`} cx={cx} cy={cy} r={r} fill={bad ? 'var(--fail)' : 'none'} stroke={bad ? 'var(--fail)' : stroke}
            strokeWidth={bad ? 2.5 : 1.25} vectorEffect="non-scaling-stroke" data-bad={bad ? '1' : undefined} />,
        );
      }
  });
  return <g>{out}</g>;
});

export function PatternDrawing({ pattern, lint, title = 'Drawing of the bed pattern' }: { pattern: Pattern; lint: LintResult | null; title?: string }) {
  const svgRef = useRef<SVGSVGElement>(null);
  const [pointed, setPointed] = useState<Pointed | null>(null);
  const { width: W, height: H } = pattern.bed;
  const u = pattern.units;
  const flagged = useMemo(() => lint?.flagged ?? new Set<string>(), [lint]);
  // Room around the bed for the front/back words, in bed units.
  const pad = Math.max(W, H) * 0.08;

  const locate = useCallback(
    (e: PointerEvent<SVGSVGElement>) => {
      const svg = svgRef.current;
      const m = svg?.getScreenCTM();
      if (!svg || !m) return;
      const pt = new DOMPoint(e.clientX, e.clientY).matrixTransform(m.inverse());
      const bx = pt.x, by = H - pt.y; // bed frame
      let best: Pointed | null = null;
      let bestD = Infinity;
      pattern.families.forEach((f, fi) => {
        const col = Math.min(f.count.x - 1, Math.max(0, Math.round((bx - f.origin.x) / f.pitch.x)));
        const row = Math.min(f.count.y - 1, Math.max(0, Math.round((by - f.origin.y) / f.pitch.y)));
        const x = f.origin.x + col * f.pitch.x, y = f.origin.y + row * f.pitch.y;
        const d = Math.hypot(x - bx, y - by) - f.holeDiameter / 2;
        if (d < bestD) {
          bestD = d;
          best = { label: positionLabel(f, col, row), x, y, family: fi, col, row, flagged: flagged.has(holeKey(fi, col, row)) };
        }
      });
      // Only name a position when the pointer is within one pitch of it.
      const near = best as Pointed | null;
      const f = near ? pattern.families[near.family] : undefined;
      setPointed(near && f && bestD < Math.max(f.pitch.x, f.pitch.y) ? near : null);
    },
    [pattern, H, flagged],
  );

  const findingMarks = (lint?.findings ?? []).filter((f) => f.severity === 'mistake' && f.holes.length === 0);
  const toUnits = (mm: number) => (u === 'in' ? mm / 25.4 : mm);
  const ring = Math.max(W, H) / 60;

  return (
    <figure className="flex flex-col gap-2">
      <svg
        ref={svgRef}
        role="img"
        aria-label={`${title}: bed ${fmt(W, u)} × ${fmt(H, u)} ${u}, front at the bottom`}
        viewBox={`${-pad} ${-pad} ${W + 2 * pad} ${H + 2 * pad}`}
        preserveAspectRatio="xMidYMid meet"
        className="h-auto max-h-[70vh] w-full touch-manipulation select-none rounded-lg border-2 border-line bg-card"
        onPointerMove={locate}
        onPointerDown={locate}
        onPointerLeave={(e) => { if (e.pointerType === 'mouse') setPointed(null); }}
        data-testid="pattern-drawing"
      >
        <rect x={0} y={0} width={W} height={H} fill="var(--paper)" stroke="var(--ink)" strokeWidth={3} vectorEffect="non-scaling-stroke" />
        {(pattern.panels ?? []).map((q, i) => (
          <g key={`p${i}`}>
            <rect x={q.x} y={H - q.y - q.height} width={q.width} height={q.height} fill="none" stroke="var(--muted)" strokeWidth={2} strokeDasharray="6 4" vectorEffect="non-scaling-stroke" />
            <text x={q.x + q.width - pad * 0.15} y={H - q.y - q.height + pad * 0.45} textAnchor="end" fontSize={pad * 0.35} fill="var(--muted)">{q.id}</text>
          </g>
        ))}
        {(pattern.channels ?? []).map((c, i) => (
          <rect key={`c${i}`} x={c.x} y={H - c.y - c.height} width={c.width} height={c.height} fill="var(--idle-bg)" stroke="var(--idle)" strokeWidth={2} vectorEffect="non-scaling-stroke" />
        ))}
        <Holes pattern={pattern} flagged={flagged} />
        {findingMarks.map((f, i) => (
          <circle key={`m${i}`} cx={toUnits(f.atMm.x)} cy={H - toUnits(f.atMm.y)} r={ring} fill="none" stroke="var(--fail)" strokeWidth={3} vectorEffect="non-scaling-stroke" />
        ))}
        {pointed && (
          <circle cx={pointed.x} cy={H - pointed.y} r={ring} fill="none" stroke="var(--focus)" strokeWidth={3} vectorEffect="non-scaling-stroke" />
        )}
        <text x={W / 2} y={H + pad * 0.7} textAnchor="middle" fontSize={pad * 0.5} fontWeight={700} fill="var(--ink)">{MAP_EDGE_WORDS.front}</text>
        <text x={W / 2} y={-pad * 0.3} textAnchor="middle" fontSize={pad * 0.4} fill="var(--muted)">{MAP_EDGE_WORDS.back}</text>
        <g stroke="var(--ink)" strokeWidth={2} vectorEffect="non-scaling-stroke" fill="none">
          <path d={`M 0 ${H} l ${pad * 0.8} 0 M 0 ${H} l 0 ${-pad * 0.8}`} vectorEffect="non-scaling-stroke" />
        </g>
        <text x={pad * 0.85} y={H + pad * 0.12} fontSize={pad * 0.35} fill="var(--ink)">X</text>
        <text x={-pad * 0.4} y={H - pad * 0.8} fontSize={pad * 0.35} fill="var(--ink)">Y</text>
      </svg>
      <figcaption className="min-h-[3rem] rounded-lg border-2 border-line bg-card px-3 py-2 font-mono text-base" aria-live="polite" data-testid="pattern-pointed">
        {pointed ? (
          <>
            <strong>{pointed.label}</strong> at X {fmt(pointed.x, u)}, Y {fmt(pointed.y, u)} {u}
            {pointed.flagged ? <span className="ml-2 font-bold text-fail">— has a mistake</span> : null}
          </>
        ) : (
          <span className="text-muted">Point at or tap a hole to see its name and centre.</span>
        )}
      </figcaption>
    </figure>
  );
}
