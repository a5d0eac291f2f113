/// <reference types="vitest/config" />
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { getViteConfig } from 'astro/config';
import { startSqld } from './tests/helpers/sqld';

// Every temporary folder of this run (databases, mailboxes, uploads, the app's and the browser's own) is made inside one
// folder, removed when the run ends: each run left about 9 MB in the system temp folder, and thousands piled up.
// Test workers, the app and Chromium inherit TMPDIR (os.tmpdir() reads it on each call). The config is read again in
// processes the run starts: they keep the run's folder (Chromium refuses a socket path much longer than this one).
if (process.env.SLIPLESS_TEST_RUN_FOLDER === undefined) {
  const runFolder = mkdtempSync(join(tmpdir(), 'slipless-run-'));
  process.env.SLIPLESS_TEST_RUN_FOLDER = runFolder;
  process.env.TMPDIR = runFolder;
  process.on('exit', () => rmSync(runFolder, { recursive: true, force: true }));
}

// Astro inlines server env values when the config loads, so the per-run test database is named
// here; tests/helpers/test-database.ts migrates and seeds it before any test file runs.
// TEST_DATABASE=sqld (npm run test:sqld) puts the same tests on a fresh libSQL server instead of
// a file, so the data and API paths are proven on both engines the app supports.
if (process.env.TEST_DATABASE === 'sqld') {
  const server = await startSqld();
  process.on('exit', () => server.kill());
  process.env.DATABASE_URL = server.url;
} else {
  process.env.DATABASE_URL = `file:${join(mkdtempSync(join(tmpdir(), 'slipless-vitest-')), 'app.db')}`;
}

// Mail goes to the local mailbox (no SMTP_HOST in tests); its folder is this run's, never the working copy's data/mail.
process.env.MAILBOX_DIR = mkdtempSync(join(tmpdir(), 'slipless-mailbox-'));

// Controller logs uploaded by tests land in this run's folder, never the working copy's data/uploads.
process.env.LOG_STORAGE_DIR = mkdtempSync(join(tmpdir(), 'slipless-logs-'));

process.env.AUTH_SECRET ??= 'test-only-secret-not-for-production-use-0123456789';

export default getViteConfig({
  test: {
    testTimeout: 30_000,
    projects: [
      {
        extends: true,
        test: {
          name: 'unit',
          include: ['tests/unit/**/*.test.ts'],
          globalSetup: ['tests/helpers/test-database.ts'],
          // Registers expect(...).toBeNear, the one tolerance matcher of the numeric tests.
          setupFiles: ['tests/helpers/tolerance.ts'],
        },
      },
      {
        extends: true,
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.e2e.ts'],
          globalSetup: ['tests/e2e/server.ts'],
          fileParallelism: false,
          testTimeout: 60_000,
          hookTimeout: 120_000,
          // A browser on a busy machine can take seconds to hydrate an island; vitest's default of 1 s made polls flaky, not stricter.
          expect: { poll: { timeout: 15_000 } },
        },
      },
    ],
  },
});
