import { resolve } from 'node:path';
import { DEFAULT_DATABASE_URL } from '../consts';
import { createBackup, restoreBackup } from '../lib/server/backup';
import { logStorageFromEnvironment } from '../lib/server/log-storage-backends';

// `npm run backup -- FOLDER` and `npm run restore -- FOLDER`: the database at DATABASE_URL and the
// controller logs in LOG_STORAGE_DIR or the S3 bucket, the same settings the app reads.
const [command, folder] = process.argv.slice(2);
if ((command !== 'backup' && command !== 'restore') || !folder) {
  console.error('Usage: npm run backup -- FOLDER   (a new folder)\n       npm run restore -- FOLDER  (a folder written by npm run backup; stop the app first)');
  process.exit(2);
}
const url = process.env.DATABASE_URL?.trim() || DEFAULT_DATABASE_URL;
const storage = logStorageFromEnvironment(process.env);
try {
  const manifest = command === 'backup' ? await createBackup(url, storage, resolve(folder)) : await restoreBackup(url, storage, resolve(folder));
  const rows = Object.values(manifest.tables).reduce((sum, n) => sum + n, 0);
  console.log(
    `Slipless: ${command === 'backup' ? 'backed up' : 'restored'} ${rows} rows in ${Object.keys(manifest.tables).length} tables ` +
      `(${manifest.method}, taken ${manifest.createdAt}) and ${manifest.uploads} stored logs ${command === 'backup' ? 'into' : 'from'} ${resolve(folder)}.`,
  );
} catch (error) {
  console.error(`Slipless: ${command} failed: ${(error as Error).message}`);
  process.exit(1);
}
