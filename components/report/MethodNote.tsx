/**
 * The report's method note: where each family's radial tolerance comes from (its fit-table row, pin and hole, or
 * the pattern), whether the fit tables' rows were checked against published copies or are from memory, and how the
 * uncertainty bands are drawn. Lengths arrive in mm and are shown in the reader's unit.
 */
import { familyWord } from '@/lib/geometry/labels';
import { BAND_NOTE } from '@/lib/geometry/band';
import { fitSourceNote, fitTablesNote } from '@/lib/geometry/fits';
import type { PatternMm } from '@/lib/geometry/units';
import { formatLength, type LengthUnit } from '@/lib/report/units';

export function MethodNote({ pattern, unit }: { pattern: PatternMm | null; unit: LengthUnit }) {
  return (
    <section className="panel flex flex-col gap-2" aria-labelledby="method-h" data-testid="method-note">
      <h2 id="method-h" className="text-xl font-bold">How the tolerances were set</h2>
      {pattern ? (
        <ul className="list-disc pl-6">
          {pattern.families.map((f) => <li key={f.id}>{fitSourceNote(familyWord(f), f.fit, f.holeDiameter, (mm) => formatLength(mm, unit))}</li>)}
        </ul>
      ) : (
        <p>The pattern this check was measured against is no longer available.</p>
      )}
      <p className="text-sm text-muted">{fitTablesNote()} {BAND_NOTE}</p>
    </section>
  );
}
