/**
 * Demo checks (invented scenario): Cedar Row Workshop's small jig plate — M6 inserts on 50 mm in two 200 mm
 * strips — photographed twice: a fresh install before flattening (four inserts drilled off and the strips
 * a little out), and the same plate after the strips were reseated and the stray inserts redrilled. The
 * photos are rendered by lib/vision/render with the 150 mm target lying on the plate, stored like uploads
 * and queued; the real worker analyses them once it starts, so a new user sees a report and a comparison.
 * Only `npm start` in demo mode calls this (never the tests' seed), once, right after the demo was seeded.
 */
import type { Db } from '@/db/client';
import { presetById } from '@/lib/geometry';
import { intakePhoto } from '@/lib/checks/intake';
import type { Storage } from '@/lib/storage/types';
import { synthesize } from '@/lib/vision/render';
import type { Actor } from './actor';
import { createBed } from './beds';

/** The two demo photos: what differs is only what the scenario says happened between them. */
const DEMO_PHOTOS = [
  { title: 'Fresh install, before flattening', file: 'jig-plate-fresh-install.jpg', options: { seed: 21, misplacedCount: 4, misplacedMm: 1.2, panelOffsetMm: 0.12 } },
  { title: 'After reseating the strips and redrilling', file: 'jig-plate-reseated.jpg', options: { seed: 22, misplacedCount: 0, misplacedMm: 0, panelOffsetMm: 0 } },
] as const;

/** Adds the jig plate and queues its two rendered photos; returns the number of checks queued. */
export async function seedDemoChecks(db: Db, storage: Storage, owner: Actor): Promise<number> {
  const pattern = presetById('m6-50')!.size({ bedWidthMm: 600, bedHeightMm: 400, stripWidthMm: 200 });
  const bed = await createBed(db, owner, {
    name: 'Jig plate',
    notes: 'Small MDF plate of M6 inserts for sign blanks, screwed down in two strips.',
    pattern: { ...pattern, name: 'Jig plate, M6 on 50 mm' },
  });
  let queued = 0;
  for (const photo of DEMO_PHOTOS) {
    const { jpeg, truth } = await synthesize(pattern, { ...photo.options, targetMm: 150 });
    await intakePhoto(db, storage, {
      workshopId: owner.workshopId,
      bedId: bed.id,
      userId: owner.user.id,
      source: jpeg,
      contentType: 'image/jpeg',
      name: photo.file,
      referenceMm: truth.target.sizeMm,
      title: photo.title,
    });
    queued++;
  }
  return queued;
}
