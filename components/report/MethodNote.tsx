/**
 * The report's method note (lib/report/method-note.ts, the text every surface shows): where each family's radial
 * tolerance comes from, whether the fit tables' rows were checked against published copies or are from memory,
 * and how the uncertainty bands are drawn. Lengths arrive in mm and are shown in the reader's unit.
 */
import { methodNote, type FitFamily } from '@/lib/report/method-note';
import type { LengthUnit } from '@/lib/report/units';

export function MethodNote({ families, unit }: { families: readonly FitFamily[] | null; unit: LengthUnit }) {
  const m = methodNote(families, unit);
  return (
    <section className="panel flex flex-col gap-2" aria-labelledby="method-h" data-testid="method-note">
      <h2 id="method-h" className="text-xl font-bold">{m.heading}</h2>
      {m.families ? (
        <ul className="list-disc pl-6">
          {m.families.map((s, k) => <li key={k}>{s}</li>)}
        </ul>
      ) : (
        <p>{m.gone}</p>
      )}
      <p className="text-sm text-muted">{m.note}</p>
    </section>
  );
}
