/**
 * Child process for the restart test: a web process in the middle of an upload. It streams a photo slowly
 * through the same intake the upload route runs (storage put, then the one transaction), printing "writing"
 * once bytes are on disk, and is killed by the test before it finishes. Args: bedId workshopId userId.
 */
import { Readable } from 'node:stream';
import { setTimeout as delay } from 'node:timers/promises';
import { getDb } from '@/db/client';
import { intakePhoto } from '@/lib/checks/intake';
import { LocalStorage } from '@/lib/storage';

const [bedId, workshopId, userId] = process.argv.slice(2) as [string, string, string];
const db = await getDb();
const storage = new LocalStorage(process.env.STORAGE_DIR!);
const jpegStart = Buffer.from([0xff, 0xd8, 0xff, 0xe0, 0x00, 0x10, 0x4a, 0x46, 0x49, 0x46, 0x00, 0x01, 0x01, 0x00, 0x00, 0x01]);
const slow = Readable.from((async function* () {
  yield jpegStart;
  for (let i = 0; ; i++) {
    yield Buffer.alloc(32 * 1024, i & 0xff);
    if (i === 3) process.stdout.write('writing\n');
    await delay(25);
  }
})());
await intakePhoto(db, storage, { workshopId, bedId, userId, source: slow, referenceMm: 150 });
process.stdout.write('finished\n');
