/** The panels with their offsets and the move that puts each back (the core's own words), in the chosen unit. */
import type { Report } from '@/lib/geometry/contract';
import { formatAngle, formatLength, type LengthUnit } from '@/lib/report/units';

export function PanelsTable({ report, unit }: { report: Report; unit: LengthUnit }) {
  if (report.panels.length === 0) return <p>This pattern has no panels.</p>;
  const L = (mm: number) => formatLength(mm, unit, { signed: true });
  return (
    <div className="gp-table-scroll overflow-x-auto">
      <table className="w-full text-left" data-testid="panels-table">
        <thead>
          <tr className="border-b-2 border-line">
            <th className="py-2 pr-4">Panel</th><th className="pr-4">Sits off by X</th><th className="pr-4">Y</th><th className="pr-4">Turned</th><th className="pr-4">±1σ</th><th className="pr-4">Holes</th><th>To put it back</th>
          </tr>
        </thead>
        <tbody>
          {report.panels.map((p) => (
            <tr key={p.id} className="border-b border-line align-top">
              <td className="py-2 pr-4 font-bold">{p.id}</td>
              <td className="pr-4 font-mono whitespace-nowrap">{L(p.dx)}</td>
              <td className="pr-4 font-mono whitespace-nowrap">{L(p.dy)}</td>
              <td className="pr-4 font-mono whitespace-nowrap">{formatAngle(p.rotationDeg, { signed: true, sigmaDeg: p.rotationUncertaintyDeg })}</td>
              <td className="pr-4 font-mono whitespace-nowrap">{formatLength(p.uncertaintyMm, unit)}</td>
              <td className="pr-4 font-mono">{p.positions}</td>
              <td className="min-w-64">{p.correction}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="mt-2 text-sm text-muted">Offsets are measured against the panels’ common fit: X to the right, Y away from you, turns counter-clockwise seen from above. Machine off and locked out before you loosen a panel.</p>
    </div>
  );
}
