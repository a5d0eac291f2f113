// The part of the `send` package (no bundled types) that static-files.ts uses.
declare module 'send' {
  import type { Stats } from 'node:fs';
  import type { IncomingMessage, ServerResponse } from 'node:http';
  import type { Stream } from 'node:stream';

  interface SendOptions {
    root?: string;
    /** false: a directory is never answered with an index file. */
    index?: false | string | string[];
    /** Milliseconds, or a string such as '1y'. */
    maxAge?: number | string;
    immutable?: boolean;
  }

  interface SendStream extends Stream {
    on(event: 'error', listener: (error: Error & { status?: number }) => void): this;
    on(event: 'directory', listener: (res: ServerResponse, path: string) => void): this;
    on(event: 'file', listener: (path: string, stat: Stats) => void): this;
    pipe<T extends NodeJS.WritableStream>(destination: T): T;
  }

  /** A stream that answers `req` with the file `path` (URL-encoded) names under `options.root`. */
  export default function send(req: IncomingMessage, path: string, options?: SendOptions): SendStream;
}
