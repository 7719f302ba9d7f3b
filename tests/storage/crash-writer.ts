/** Child process for the crash test: streams slowly into local storage until it is killed. */
import { Readable } from 'node:stream';
import { setTimeout as delay } from 'node:timers/promises';
import { LocalStorage } from '@/lib/storage';

const root = process.argv[2]!;
const storage = new LocalStorage(root);
const slow = Readable.from((async function* () {
  for (let i = 0; ; i++) {
    yield Buffer.alloc(16 * 1024, i & 0xff);
    if (i === 4) process.stdout.write('writing\n');
    await delay(20);
  }
})());
await storage.put(slow, { key: 'photos/w/crash', maxBytes: 10 ** 9 });
