import { LOG_STORAGE_DIR, S3_ACCESS_KEY_ID, S3_BUCKET, S3_ENDPOINT, S3_REGION, S3_SECRET_ACCESS_KEY } from 'astro:env/server';
import { DEFAULT_LOG_STORAGE_DIR } from '../../consts';
import { diskLogStorage, s3LogStorage, s3SettingsFrom, type LogStorage } from './log-storage-backends';

export { diskLogStorage, s3LogStorage, s3SettingsFrom } from './log-storage-backends';
export type { LogStorage, S3Settings, StoredLogKey } from './log-storage-backends';

let configured: LogStorage | undefined;

/** The server's one log storage: the S3 bucket when S3_ENDPOINT is set, else the folder LOG_STORAGE_DIR (default data/uploads). */
export function getLogStorage(): LogStorage {
  configured ??= (() => {
    const s3 = s3SettingsFrom({ endpoint: S3_ENDPOINT, bucket: S3_BUCKET, region: S3_REGION, accessKeyId: S3_ACCESS_KEY_ID, secretAccessKey: S3_SECRET_ACCESS_KEY });
    return s3 ? s3LogStorage(s3) : diskLogStorage(LOG_STORAGE_DIR?.trim() || DEFAULT_LOG_STORAGE_DIR);
  })();
  return configured;
}
