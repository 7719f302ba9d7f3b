/**
 * The photo guide's examples: for each problem the photo check looks for, a good photo beside a bad one, both
 * drawn by Gridproof's renderer (`npm run -s guide-images` writes public/guide/*.webp; each bad one is checked to
 * get its code from the quality stage), with what the check measures and what to do (lib/vision/advice.ts).
 */
import type { PhotoIssueCode } from '@/lib/geometry/contract';
import { ISSUE_ADVICE } from '@/lib/vision/advice';

interface Example {
  code: PhotoIssueCode;
  title: string;
  /** What the check sees in the bad photo. */
  seen: string;
  good: 'good-close' | 'good-whole';
}

export const PHOTO_EXAMPLES: Example[] = [
  { code: 'blurred', title: 'Out of focus', seen: 'The edges of the square and of the holes are spread over several pixels.', good: 'good-close' },
  { code: 'motion-blur', title: 'Camera shake', seen: 'Everything is smeared the same way: the phone moved while the photo was taken.', good: 'good-close' },
  { code: 'overexposed', title: 'Too bright', seen: 'The white of the square is burnt out and its black looks grey: the edges cannot be placed.', good: 'good-close' },
  { code: 'underexposed', title: 'Too dark', seen: 'The paper reads grey, and the noise of a dark shot blurs the edges.', good: 'good-close' },
  { code: 'holes-small', title: 'Holes too small', seen: 'Too few pixels across each hole, as in a copy sent through a messenger.', good: 'good-close' },
  { code: 'target-small', title: 'Square too small', seen: 'The square spans too few pixels to set the scale well.', good: 'good-whole' },
  { code: 'tilted', title: 'Taken at a slant', seen: 'The far side of the bed shrinks against the near side.', good: 'good-whole' },
  { code: 'target-cut', title: 'Square cut off', seen: 'Part of the square is outside the photo: it cannot be measured at all.', good: 'good-whole' },
  { code: 'bed-cut', title: 'Bed cut off', seen: 'Part of the bed is outside the photo: those holes go unchecked.', good: 'good-whole' },
];

function Shot({ file, alt, label, bad }: { file: string; alt: string; label: string; bad: boolean }) {
  return (
    <figure className="flex min-w-0 flex-1 flex-col gap-1">
      {/* eslint-disable-next-line @next/next/no-img-element -- small committed WebP, already at its shown size */}
      <img src={`/guide/${file}.webp`} alt={alt} width={480} height={360} loading="lazy" className={`h-auto w-full rounded-lg border-4 ${bad ? 'border-warn' : 'border-pass'}`} />
      <figcaption className={`text-sm font-bold ${bad ? 'text-warn' : 'text-pass'}`}>{label}</figcaption>
    </figure>
  );
}

export function PhotoExamples() {
  return (
    <section id="photo" className="flex flex-col gap-4" aria-labelledby="photo-examples-h" data-testid="photo-examples">
      <h2 id="photo-examples-h" className="text-2xl font-bold">What the photo check looks for</h2>
      <p>Right after the upload Gridproof measures the photo itself and says what it can judge. These are the problems it calls out, each drawn by Gridproof&apos;s own photo renderer: a good photo on the left, the problem on the right.</p>
      <ul className="flex flex-col gap-4">
        {PHOTO_EXAMPLES.map((e) => (
          <li key={e.code} className="panel flex flex-col gap-3" data-code={e.code}>
            <h3 className="text-lg font-bold">{e.title}</h3>
            <div className="flex gap-3">
              <Shot file={e.good} alt="A good photo of the bed and the reference square" label="Good" bad={false} />
              <Shot file={e.code} alt={`${e.title}: ${e.seen}`} label={e.title} bad />
            </div>
            <p>{e.seen}</p>
            <p className="font-bold">{ISSUE_ADVICE[e.code]}</p>
          </li>
        ))}
      </ul>
    </section>
  );
}
