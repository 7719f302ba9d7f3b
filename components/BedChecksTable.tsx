/**
 * A bed's checks, newest first: when (linked to the check), the verdict, RMS and worst deviation in the user's
 * length unit (lib/report/units: 0.01 mm or 0.0001 in, as the report), and how many positions are out.
 */
import Link from 'next/link';
import type { CheckListRow } from '@/db/queries/beds';
import { formatUtc } from '@/lib/dates';
import { formatLength, type LengthUnit } from '@/lib/report/units';
import { Verdict } from './Verdict';

export function BedChecksTable({ checks, unit }: { checks: CheckListRow[]; unit: LengthUnit }) {
  const len = (mm: number | null) => (mm === null ? '—' : formatLength(mm, unit, { suffix: false }));
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-left">
        <thead>
          <tr className="border-b-2 border-line"><th className="py-2 pr-4">When</th><th className="pr-4">Result</th><th className="pr-4">RMS, {unit}</th><th className="pr-4">Worst, {unit}</th><th>Out</th></tr>
        </thead>
        <tbody>
          {checks.map((c) => (
            <tr key={c.id} className="border-b border-line">
              <td className="py-2 pr-4"><Link href={`/checks/${c.id}`} className="underline">{c.title ? <strong>{c.title}<br /></strong> : null}{formatUtc(c.createdAt)}</Link></td>
              <td className="pr-4"><Verdict status={c.status} verdict={c.verdict} /></td>
              <td className="pr-4 font-mono">{len(c.rmsMm)}</td>
              <td className="pr-4 font-mono">{len(c.maxMm)}</td>
              <td className="font-mono">{c.outCount ?? '—'}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
