/**
 * `npm run db:migrate`: applies the committed migrations in drizzle/ to DATABASE_URL (default
 * file:data/gridproof.db). Idempotent. Prints one JSON line.
 */
import { closeDb, DEFAULT_DATABASE_URL, getDb, migrateDb } from '@/db/client';

export async function runMigrations(): Promise<void> {
  await migrateDb(await getDb());
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const started = Date.now();
  try {
    await runMigrations();
    console.log(JSON.stringify({ migrated: process.env.DATABASE_URL ?? DEFAULT_DATABASE_URL, ms: Date.now() - started }));
  } catch (err) {
    console.error('[gridproof] migration failed:', err);
    process.exitCode = 1;
  } finally {
    await closeDb();
  }
}
