// Makes sure Debian's Chromium is present before the browser tests; never downloads a browser build.
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { CHROMIUM_PATH } from './browser';

if (!existsSync(CHROMIUM_PATH)) {
  if (process.getuid?.() !== 0) {
    console.error(
      `Browser tests need Debian's Chromium at ${CHROMIUM_PATH}. Install it with: sudo apt-get update && sudo apt-get install -y chromium`,
    );
    process.exit(1);
  }
  console.log(`Installing Debian's chromium package (needed by the browser tests)...`);
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit' });
  execFileSync('apt-get', ['install', '-y', '-qq', 'chromium'], { stdio: 'inherit', env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } });
}
