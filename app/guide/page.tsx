import type { Metadata } from 'next';
import Link from 'next/link';
import { PhotoExamples } from '@/components/guide/PhotoExamples';
import { WhichReference } from '@/components/guide/WhichReference';
import { PublicFrame } from '@/components/share/PublicFrame';

export const metadata: Metadata = { title: 'How to photograph a bed' };

const STEPS: { title: string; body: string[] }[] = [
  {
    title: 'Make the machine safe first',
    body: [
      'Stop the spindle and wait until it has stopped turning. Switch the machine off (and lock it out where your shop does) before you reach onto the bed, place the target or brush the holes.',
      'Keep the gantry parked out of the way so it does not hide part of the bed.',
    ],
  },
  {
    title: 'Clean the holes',
    body: [
      'Brush or vacuum chips and dust out of every insert, dog hole and T-track. A hole full of chips looks smaller or off-centre in the photo. Compressed air throws chips at your eyes: wear eye protection if you use it.',
    ],
  },
  {
    title: 'Lay the target flat, near the middle',
    body: [
      'Print the reference target at 100 %, measure its square with a rule and enter what you measured. Lay it flat on the bed, away from the edges, where it covers as few holes as it must: holes under it, or whose rim its edge crosses, are reported as not seen, never in or out. Keep clamps and offcuts off the holes for the same reason. Tape the corners if the sheet curls.',
    ],
  },
  {
    title: 'Stand above the middle of the bed',
    body: [
      'Hold the phone level, looking straight down, over the middle of the bed and high enough that the whole bed fills the frame with a little margin. A step stool is safer than leaning over the machine; never climb onto it.',
      'Straight down matters more than a perfect distance: a tilted view is corrected, but the less tilt the more precise the check.',
    ],
  },
  {
    title: 'Use the main camera, not the wide-angle one',
    body: [
      'Phones with several lenses switch to the wide-angle one when you zoom out; its stronger distortion costs precision. Stay at 1× and step back instead. No digital zoom, no panorama, no portrait mode, no filters.',
    ],
  },
  {
    title: 'Light without glare',
    body: [
      'Even, soft light: daylight or the shop lights, not a flash. Shiny inserts and aluminium T-track reflect spots of light that hide their edges; move a lamp or tilt your body until no insert shows a bright spot. Avoid your own shadow across the bed.',
    ],
  },
  {
    title: 'Take it sharp, send the original',
    body: [
      'Tap to focus on the bed, hold still, and take two or three photos; upload the sharpest one as it came out of the camera (not a screenshot or a messenger copy, which are smaller).',
    ],
  },
];

/** How to photograph a bed so the check is precise, with the usual cautions. */
export default function PhotoGuidePage() {
  return (
    <PublicFrame>
      <article className="flex max-w-3xl flex-col gap-6">
        <h1 className="text-3xl font-bold">How to photograph a bed</h1>
        <aside className="panel border-l-8 border-l-warn" aria-label="Safety">
          <p className="font-bold">Safety first</p>
          <ul className="mt-1 list-disc pl-6">
            <li>Machine powered off and the spindle stopped before you reach onto the bed — every time, even for a second.</li>
            <li>When you surface the spoilboard before a check: eye and hearing protection, dust extraction on, hands clear of the cutter.</li>
            <li>This guide does not replace the machine maker&apos;s manual or your local rules; where they differ, follow them.</li>
          </ul>
        </aside>
        <ol className="flex flex-col gap-4">
          {STEPS.map((s, i) => (
            <li key={s.title} className="panel">
              <h2 className="text-xl font-bold">{i + 1}. {s.title}</h2>
              {s.body.map((b) => <p key={b} className="mt-2">{b}</p>)}
            </li>
          ))}
        </ol>
        <PhotoExamples />
        <WhichReference />
        <p><Link className="btn" href="/target">Print the reference target</Link></p>
      </article>
    </PublicFrame>
  );
}
