/**
 * Two projects: `unit` (everything under tests/ except tests/e2e; runs alone with
 * `npx vitest run --config tests/vitest.config.ts --project unit` or by naming a folder) and `e2e` (browser and
 * HTTP tests against the built app: its globalSetup builds once if needed, starts `next start` on a free port
 * with a fresh database and stops it afterwards). `npm test` runs both.
 */
import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

const root = fileURLToPath(new URL('..', import.meta.url));
const alias = {
  '@': root.replace(/\/$/, ''),
  // The session module is marked server-only; in tests it runs in plain Node like on the server.
  'server-only': fileURLToPath(new URL('../node_modules/server-only/empty.js', import.meta.url)),
};

export default defineConfig({
  root,
  resolve: { alias },
  test: {
    environment: 'node',
    testTimeout: 60_000,
    hookTimeout: 300_000,
    pool: 'forks',
    projects: [
      {
        extends: true,
        test: { name: 'unit', include: ['tests/**/*.test.ts'], exclude: ['tests/e2e/**', 'node_modules/**'] },
      },
      {
        extends: true,
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.ts'],
          globalSetup: ['tests/e2e/global-setup.ts'],
          // One app server for all e2e files; run them one after another.
          fileParallelism: false,
          testTimeout: 90_000,
          // A page answers within seconds on a busy 2-core machine (bcrypt, first render), not within the 1 s default.
          expect: { poll: { timeout: 15_000, interval: 100 } },
        },
      },
    ],
  },
});
