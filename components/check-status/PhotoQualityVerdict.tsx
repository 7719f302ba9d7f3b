/**
 * The photo-quality verdict, shown as soon as the worker has it (before the holes are measured) and above the
 * report: what the photo can judge, and each problem with what was measured and what to do.
 */
import Link from 'next/link';
import type { PhotoQuality } from '@/lib/geometry/contract';
import { qualityHeadline, scaleLine } from './quality-words';

export function PhotoQualityVerdict({ quality, phase, uploadHref }: { quality: PhotoQuality; phase: 'running' | 'settled' | 'failed'; uploadHref?: string }) {
  const bad = quality.issues.length > 0;
  const scale = scaleLine(quality);
  return (
    <section className={`panel flex flex-col gap-3 border-2 ${bad ? 'border-warn bg-warn-bg text-warn' : 'border-pass bg-pass-bg text-pass'}`} data-testid="photo-quality" data-issues={quality.issues.map((i) => i.code).join(' ')} role="status">
      <h2 className="text-lg font-bold">{bad ? 'The photo has problems' : 'The photo is good'}</h2>
      <p className="text-base" data-testid="photo-quality-headline">{qualityHeadline(quality)}</p>
      {scale && <p className="text-sm">{scale}</p>}
      {bad && (
        <ul className="flex flex-col gap-2">
          {quality.issues.map((i) => (
            <li key={i.code} className="flex flex-col" data-code={i.code}>
              <span>{i.message}</span>
              <span className="font-bold">{i.advice}</span>
            </li>
          ))}
        </ul>
      )}
      {/* settled: that the figures carry the problems is the report's own note (PhotoNote) just below, said once */}
      {bad && phase === 'running' && <p className="text-sm">It is measured anyway; you can take a better photo meanwhile.</p>}
      {bad && uploadHref && <Link href={uploadHref} className="btn btn-quiet self-start">Upload a better photo</Link>}
      <p className="text-sm"><Link className="underline" href="/guide#photo">How to take a good photo</Link></p>
    </section>
  );
}
