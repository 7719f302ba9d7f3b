/** The lattice's global scale and squareness with their 1σ uncertainty, or why they were not observed. */
import type { Report } from '@/lib/geometry/contract';
import { bandRadiusMm } from '@/lib/geometry/band';
import { formatAngle, formatLength, formatPpm, scaleOver, type LengthUnit } from '@/lib/report/units';

export function LatticeFigures({ report, unit, bedWidthMm, bedHeightMm }: { report: Report; unit: LengthUnit; bedWidthMm: number | null; bedHeightMm: number | null }) {
  const l = report.lattice;
  const u = l.uncertainty;
  const rows: { name: string; value: string; plain: string }[] = [];
  if (l.observed && l.scaleX !== null && l.scaleY !== null && l.squarenessDeg !== null) {
    const wx = bedWidthMm ?? 1000, wy = bedHeightMm ?? 1000;
    rows.push({ name: 'Scale along X', value: formatPpm(l.scaleX, u.scaleX), plain: `${scaleOver(l.scaleX, wx, unit)} over ${bedWidthMm ? 'the bed’s width' : '1 m'}` });
    rows.push({ name: 'Scale along Y', value: formatPpm(l.scaleY, u.scaleY), plain: `${scaleOver(l.scaleY, wy, unit)} over ${bedHeightMm ? 'the bed’s depth' : '1 m'}` });
    rows.push({ name: 'Squareness', value: formatAngle(l.squarenessDeg, { signed: true, sigmaDeg: u.squarenessDeg }), plain: `the X and Y rows meet at ${formatAngle(90 - l.squarenessDeg)}` });
  }
  return (
    <div className="flex flex-col gap-2" data-testid="lattice">
      {rows.length ? (
        <dl className="grid grid-cols-1 gap-3 sm:grid-cols-3">
          {rows.map((r) => (
            <div key={r.name} className="rounded-lg border border-line p-3">
              <dt className="font-bold">{r.name}</dt>
              <dd className="font-mono text-lg">{r.value}</dd>
              <dd className="text-sm text-muted">{r.plain}</dd>
            </div>
          ))}
        </dl>
      ) : (
        <p><strong>Scale and squareness: not observed.</strong> {l.reason ? `Why: ${l.reason}.` : 'This photo cannot tell them apart from the camera’s view.'}</p>
      )}
      {l.shapeCheck && l.shapeCheck.worstMm !== null && l.shapeCheck.uncertaintyMm !== null && (
        <p data-testid="shape-check"><strong>Overall size and squareness: {l.shapeCheck.verdict === 'in' ? 'within tolerance' : l.shapeCheck.verdict === 'out' ? 'out of tolerance' : 'too close to call with this reference'}.</strong> They move a position by up to {formatLength(l.shapeCheck.worstMm, unit)} ± {formatLength(bandRadiusMm(l.shapeCheck.uncertaintyMm), unit)} (95 %); {formatLength(l.shapeCheck.toleranceMm, unit)} allowed.</p>
      )}
      <p className="text-sm text-muted">Bed turned {formatAngle(l.rotationDeg, { sigmaDeg: u.rotationDeg })} in the photo; uncertainties are one standard deviation. Positions’ deviations on the whole bed are measured after the best rigid placement of the whole lattice; hole to hole, after the best affine placement, which takes the lattice’s own size and squareness out.</p>
    </div>
  );
}
