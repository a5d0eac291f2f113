/**
 * A log file read where it lies (a Blob: a File picked in the browser), with the platform's own
 * streams only, so it runs in a browser worker and in Node alike: gzip is told by its magic bytes
 * (1f 8b, RFC 1952 section 2.3.1), never by the file name, and decompressed with
 * DecompressionStream; the bytes are decoded as UTF-8 and handed to readLog chunk by chunk, so
 * memory stays bounded by a few chunks whatever the file's length.
 */
import Papa from 'papaparse';
import type { LogSource } from './read-log';

/** Whether the file starts with the gzip magic bytes. */
export async function isGzip(file: Blob): Promise<boolean> {
  const head = new Uint8Array(await file.slice(0, 2).arrayBuffer());
  return head.length === 2 && head[0] === 0x1f && head[1] === 0x8b;
}

/** Bytes read from the file at a time: a few of these in flight bound the memory, and progress moves in steps this small. */
export const FILE_CHUNK_BYTES = 128 * 1024;

/**
 * The file's text, decompressed when it is gzip; `onBytes` hears the file bytes read so far
 * (compressed bytes for gzip). The file is read in FILE_CHUNK_BYTES slices, each only when the
 * stages after it ask for more, so the count runs at most a few slices ahead of the comparison.
 */
export async function openLogText(file: Blob, onBytes?: (bytesRead: number) => void): Promise<ReadableStream<string>> {
  let offset = 0;
  let bytes: ReadableStream<BufferSource> = new ReadableStream<Uint8Array<ArrayBuffer>>(
    {
      async pull(controller) {
        if (offset >= file.size) {
          controller.close();
          return;
        }
        const chunk = new Uint8Array(await file.slice(offset, offset + FILE_CHUNK_BYTES).arrayBuffer());
        offset += chunk.byteLength;
        onBytes?.(offset);
        controller.enqueue(chunk);
      },
    },
    { highWaterMark: 0 },
  );
  if (await isGzip(file)) bytes = bytes.pipeThrough(new DecompressionStream('gzip'));
  return bytes.pipeThrough(new TextDecoderStream());
}

type Listener = (value?: unknown) => void;

/** A text stream readLog can read, and the means to stop reading it once the comparison no longer needs it. */
export interface StreamedLog {
  source: LogSource;
  /** Stops reading (the comparison has ended, or was aborted: the reader then fails with the abort reason). */
  stop: () => void;
}

/**
 * The text stream in the shape papaparse reads as a Node stream ("readable", "read", "on"): papaparse
 * has no reader for web streams, and each chunk is parsed, and its samples compared, before the next
 * is read, which is the back-pressure that keeps memory bounded. An abort of `signal` fails the read
 * with its reason at the next chunk.
 */
export function streamLogText(text: ReadableStream<string>, signal?: AbortSignal): StreamedLog {
  const listeners = new Map<string, Set<Listener>>();
  const emit = (event: string, value?: unknown) => {
    for (const listener of [...(listeners.get(event) ?? [])]) listener(value);
  };
  const reader = text.getReader();
  let stopped = false;
  let started = false;
  const pump = async () => {
    try {
      for (;;) {
        signal?.throwIfAborted();
        const { done, value } = await reader.read();
        if (stopped) return;
        signal?.throwIfAborted();
        if (done) {
          emit('end');
          return;
        }
        emit('data', value);
      }
    } catch (error) {
      if (!stopped) emit('error', error);
      await reader.cancel().catch(() => undefined);
    }
  };
  const stream = {
    readable: true,
    read: () => null,
    pause: () => undefined,
    resume: () => undefined,
    on(event: string, listener: Listener) {
      if (!listeners.has(event)) listeners.set(event, new Set());
      listeners.get(event)!.add(listener);
      // papaparse subscribes to data, end and error in one go; reading starts once it has.
      if (event === 'data' && !started) {
        started = true;
        queueMicrotask(() => void pump());
      }
      return stream;
    },
    removeListener(event: string, listener: Listener) {
      listeners.get(event)?.delete(listener);
      return stream;
    },
  };
  return {
    // papaparse tells a Node stream by these members alone.
    source: stream as unknown as Papa.LocalFile,
    stop: () => {
      if (stopped) return;
      stopped = true;
      void reader.cancel().catch(() => undefined);
    },
  };
}

/** Longest header line read, in characters: a log with thousands of columns still fits. */
export const MAX_HEADER_CHARACTERS = 1 << 20;

/** The column names of the log's first line (trimmed), or an empty list for an empty file; throws for a damaged gzip file. */
export async function readLogHeader(file: Blob): Promise<string[]> {
  const reader = (await openLogText(file)).getReader();
  let text = '';
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      text += value;
      if (/[\r\n]/.test(value) || text.length > MAX_HEADER_CHARACTERS) break;
    }
  } finally {
    await reader.cancel().catch(() => undefined);
  }
  const first = text.split(/\r\n|\n|\r/, 1)[0] ?? '';
  if (first === '') return [];
  const parsed = Papa.parse<string[]>(first, { header: false, dynamicTyping: false });
  return (parsed.data[0] ?? []).map((name) => name.trim());
}
