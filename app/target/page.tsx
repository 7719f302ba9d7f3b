import type { Metadata } from 'next';
import Link from 'next/link';
import { PublicFrame } from '@/components/share/PublicFrame';

export const metadata: Metadata = { title: 'Printable target' };

const SMALL = [{ paper: 'a4', name: 'A4 PDF' }, { paper: 'letter', name: 'Letter PDF' }] as const;
const LARGE = [{ paper: 'a3', name: 'A3 PDF' }, { paper: 'tabloid', name: 'Tabloid PDF' }] as const;
const SIZES = [
  { size: '100mm', name: '100 mm', when: 'small beds and close-up photos', papers: SMALL },
  { size: '150mm', name: '150 mm', when: 'most beds (the usual choice)', papers: SMALL },
  { size: '4in', name: '4 in', when: 'if you measure in inches', papers: SMALL },
  { size: '250mm', name: '250 mm', when: 'large beds: a more precise overall size (A3 or Tabloid printer)', papers: LARGE },
] as const;

/** The reference target to print: sizes and papers, and how to print and measure it. */
export default function TargetPage() {
  return (
    <PublicFrame>
      <article className="flex max-w-3xl flex-col gap-6">
        <h1 className="text-3xl font-bold">Printable target</h1>
        <p>Gridproof finds this square in your photo and takes its size from what you measure on the print. Choose a size and your paper:</p>
        <ul className="grid grid-cols-1 gap-3 sm:grid-cols-2 lg:grid-cols-4" data-testid="target-links">
          {SIZES.map((s) => (
            <li key={s.size} className="panel flex flex-col gap-2">
              <p className="text-xl font-bold">{s.name}</p>
              <p className="text-sm text-muted">{s.when}</p>
              {s.papers.map((p, k) => (
                <a key={p.paper} className={k === 0 ? 'btn' : 'btn btn-quiet'} href={`/api/target.pdf?size=${s.size}&paper=${p.paper}`}>{p.name}</a>
              ))}
            </li>
          ))}
        </ul>
        <section className="panel">
          <h2 className="text-xl font-bold">Print and measure</h2>
          <ol className="mt-2 list-decimal pl-6">
            <li>Print at <strong>100 %</strong> (&quot;actual size&quot;; turn off &quot;fit to page&quot; and any scaling).</li>
            <li>Check the ruler on the sheet against a steel rule; if it is off, your printer scaled the page.</li>
            <li>Measure the square&apos;s side between its outer edges, along both directions, with a steel rule or calipers, and note the mean.</li>
            <li>Enter that measured size when you upload the photo — not the nominal one.</li>
            <li>Keep the print flat and clean; glue it to a stiff board if you will use it often.</li>
          </ol>
        </section>
        <p className="text-sm text-muted">Machine off and spindle stopped before you lay the target on the bed. <Link className="underline" href="/guide">How to take the photo</Link>.</p>
      </article>
    </PublicFrame>
  );
}
