/**
 * `npm run seed`: migrates DATABASE_URL, then seeds the demo workshop (lib/services/demo.ts) if the
 * database holds no workshop yet. Never touches a database that has one. Prints one JSON line.
 */
import { closeDb, getDb, migrateDb } from '@/db/client';
import { seedDemo } from '@/lib/services/demo';

export async function runSeed(): Promise<{ seeded: boolean }> {
  const db = await getDb();
  await migrateDb(db);
  return seedDemo(db);
}

if (import.meta.url === `file://${process.argv[1]}`) {
  try {
    const r = await runSeed();
    console.log(JSON.stringify({ seeded: r.seeded, note: r.seeded ? 'demo workshop created' : 'database already has a workshop; left alone' }));
  } catch (err) {
    console.error('[gridproof] seeding failed:', err);
    process.exitCode = 1;
  } finally {
    await closeDb();
  }
}
