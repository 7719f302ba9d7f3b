/**
 * The measured distances given with the check: what was given, what the photo made of it with the reference square
 * alone, and what remains after the fit combined them (residual, and that over its own 1σ), in the chosen unit.
 */
import type { Report } from '@/lib/geometry/contract';
import { formatLength, type LengthUnit } from '@/lib/report/units';

export function DistancesTable({ report, unit }: { report: Report; unit: LengthUnit }) {
  const rows = report.distances ?? [];
  if (!rows.length) return null;
  const L = (mm: number | null, signed = false) => (mm === null ? '—' : formatLength(mm, unit, { signed }));
  return (
    <div className="gp-table-scroll flex flex-col gap-2 overflow-x-auto">
      <h3 className="font-bold">Measured distances</h3>
      <table className="w-full text-left" data-testid="distances-table">
        <thead>
          <tr className="border-b-2 border-line">
            <th className="py-2 pr-4">From</th><th className="pr-4">To</th><th className="pr-4">Given</th><th className="pr-4">Photo with the square alone</th><th className="pr-4">After the fit</th><th>Given − fit</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((d, i) => (
            <tr key={i} className="border-b border-line align-top">
              <td className="py-2 pr-4 font-bold">{d.from}</td>
              <td className="pr-4 font-bold">{d.to}</td>
              <td className="pr-4 font-mono whitespace-nowrap">{L(d.mm)} ± {L(d.sigmaMm)}</td>
              <td className="pr-4 font-mono whitespace-nowrap">{L(d.squareMm)}</td>
              <td className="pr-4 font-mono whitespace-nowrap">{L(d.fittedMm)}</td>
              <td className="font-mono whitespace-nowrap">
                {d.used ? `${L(d.residualMm, true)} (${Math.abs(d.residualSigmas ?? 0).toFixed(1)}σ)` : `not used: ${d.note ?? ''}`}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="text-sm text-muted">The given distances and the reference square are weighed by their uncertainties together to set the scale and squareness above. A residual beyond 3σ means a distance disagrees with the photo: check its labels and the reading.</p>
    </div>
  );
}
