/** The log storage backends, free of astro:env so that the start command (run outside Astro) can seed demo logs through them. */
import { createWriteStream } from 'node:fs';
import { mkdir, open, opendir, rename, rm, stat } from 'node:fs/promises';
import { dirname, isAbsolute, join, relative, resolve } from 'node:path';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { DeleteObjectCommand, GetObjectCommand, paginateListObjectsV2, S3Client } from '@aws-sdk/client-s3';
import { Upload } from '@aws-sdk/lib-storage';
import { DEFAULT_LOG_STORAGE_DIR } from '../../consts';

/**
 * Where controller logs' bytes live. Every method streams: a log may be 500 MiB, so no
 * implementation holds a whole file in memory. Keys are made by the server (team and upload ids).
 */
export interface LogStorage {
  /** Stores `body` under `key`; the object exists (and is complete) only once this resolves, and a failed put leaves nothing. */
  put(key: string, body: Readable): Promise<void>;
  /** The stored bytes under `key`; rejects when there are none. */
  get(key: string): Promise<Readable>;
  /** Removes `key` (and whatever of it a crash left half-written); removing what is not there is not an error. */
  delete(key: string): Promise<void>;
  /**
   * Every key in the storage with when it was last written, a page at a time (never the whole
   * listing in memory), including logs still arriving or left half-written by a crash; for the
   * sweeper that removes stored logs no upload row refers to.
   */
  list(): AsyncIterable<StoredLogKey>;
}

export interface StoredLogKey {
  key: string;
  modifiedAt: Date;
}

/** Keys are the server's own `team/upload` ids; anything that could climb out of the folder is refused. */
const SAFE_KEY = /^[\w-]+(\/[\w-]+)*$/;

function checkedKey(key: string): string {
  if (!SAFE_KEY.test(key)) throw new Error(`Refusing the log storage key ${JSON.stringify(key)}.`);
  return key;
}

const PARTIAL = '.part';

/** The files under `folder` (recursively) as keys relative to `root`, a `.part` file under the key it is being written for. */
async function* filesUnder(root: string, folder: string): AsyncGenerator<StoredLogKey> {
  let entries;
  try {
    entries = await opendir(folder);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return;
    throw error;
  }
  for await (const entry of entries) {
    const path = join(folder, entry.name);
    if (entry.isDirectory()) {
      yield* filesUnder(root, path);
      continue;
    }
    if (!entry.isFile()) continue;
    const key = relative(root, path).split(/[\\/]/).join('/');
    const named = key.endsWith(PARTIAL) ? key.slice(0, -PARTIAL.length) : key;
    if (!SAFE_KEY.test(named)) continue;
    // A file removed since the folder was read is simply no longer listed.
    const info = await stat(path).catch(() => null);
    if (info) yield { key: named, modifiedAt: info.mtime };
  }
}

/** Log storage in a folder on the server's disk; a file being written carries `.part` until it is complete. */
export function diskLogStorage(folder: string): LogStorage {
  const root = resolve(folder);
  const pathOf = (key: string) => {
    const path = resolve(root, checkedKey(key));
    const inside = relative(root, path);
    if (!inside || inside.startsWith('..') || isAbsolute(inside)) throw new Error(`Refusing the log storage key ${JSON.stringify(key)}.`);
    return path;
  };
  return {
    async put(key, body) {
      const file = pathOf(key);
      await mkdir(dirname(file), { recursive: true, mode: 0o700 });
      // Written under another name first, so a reader never opens half a log and a crash leaves only a recognisable `.part`.
      const partial = `${file}${PARTIAL}`;
      try {
        await pipeline(body, createWriteStream(partial, { mode: 0o600 }));
        await rename(partial, file);
      } catch (error) {
        await rm(partial, { force: true });
        throw error;
      }
    },
    async get(key) {
      const handle = await open(pathOf(key), 'r');
      return handle.createReadStream();
    },
    async delete(key) {
      const file = pathOf(key);
      await rm(file, { force: true });
      await rm(`${file}${PARTIAL}`, { force: true });
    },
    list() {
      return filesUnder(root, root);
    },
  };
}

export interface S3Settings {
  endpoint: string;
  bucket: string;
  region: string;
  accessKeyId: string;
  secretAccessKey: string;
}

/**
 * Log storage in an S3 bucket (path-style addressing, so MinIO, Ceph and other S3-compatible
 * stores work). Puts go through the SDK's multipart upload, which makes the object appear only
 * when the last part is in and aborts the parts of a failed upload.
 */
export function s3LogStorage(settings: S3Settings): LogStorage {
  const client = new S3Client({
    endpoint: settings.endpoint,
    region: settings.region,
    forcePathStyle: true,
    credentials: { accessKeyId: settings.accessKeyId, secretAccessKey: settings.secretAccessKey },
  });
  const Bucket = settings.bucket;
  return {
    async put(key, body) {
      await new Upload({ client, params: { Bucket, Key: checkedKey(key), Body: body } }).done();
    },
    async get(key) {
      const object = await client.send(new GetObjectCommand({ Bucket, Key: checkedKey(key) }));
      if (!(object.Body instanceof Readable)) throw new Error(`The log storage answered no stream for ${key}.`);
      return object.Body;
    },
    async delete(key) {
      await client.send(new DeleteObjectCommand({ Bucket, Key: checkedKey(key) }));
    },
    // Parts of an interrupted multipart upload are no object and never listed here; the SDK aborts
    // them on failure, and a bucket lifecycle rule (AbortIncompleteMultipartUpload) catches a crash.
    async *list() {
      for await (const page of paginateListObjectsV2({ client }, { Bucket })) {
        for (const object of page.Contents ?? []) {
          if (object.Key && SAFE_KEY.test(object.Key) && object.LastModified) yield { key: object.Key, modifiedAt: object.LastModified };
        }
      }
    },
  };
}

/** The S3 settings when S3_ENDPOINT is set (then the bucket and both keys must be too), else null for disk storage. */
export function s3SettingsFrom(env: { endpoint?: string; bucket?: string; region?: string; accessKeyId?: string; secretAccessKey?: string }): S3Settings | null {
  const endpoint = env.endpoint?.trim();
  if (!endpoint) return null;
  const missing = (['bucket', 'accessKeyId', 'secretAccessKey'] as const).filter((name) => !env[name]?.trim());
  if (missing.length) throw new Error(`S3_ENDPOINT is set, so the controller log storage also needs ${missing.map((name) => ({ bucket: 'S3_BUCKET', accessKeyId: 'S3_ACCESS_KEY_ID', secretAccessKey: 'S3_SECRET_ACCESS_KEY' })[name]).join(', ')}.`);
  return { endpoint, bucket: env.bucket!.trim(), region: env.region?.trim() || 'us-east-1', accessKeyId: env.accessKeyId!.trim(), secretAccessKey: env.secretAccessKey!.trim() };
}

/** The log storage the environment's settings name (as getLogStorage reads them through astro:env), for commands run outside Astro. */
export function logStorageFromEnvironment(env: NodeJS.ProcessEnv): LogStorage {
  const s3 = s3SettingsFrom({ endpoint: env.S3_ENDPOINT, bucket: env.S3_BUCKET, region: env.S3_REGION, accessKeyId: env.S3_ACCESS_KEY_ID, secretAccessKey: env.S3_SECRET_ACCESS_KEY });
  return s3 ? s3LogStorage(s3) : diskLogStorage(env.LOG_STORAGE_DIR?.trim() || DEFAULT_LOG_STORAGE_DIR);
}
