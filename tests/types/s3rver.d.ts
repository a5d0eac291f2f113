// The part of the `s3rver` package (no bundled types) that the log storage tests use.
declare module 's3rver' {
  interface S3rverOptions {
    address?: string;
    port?: number;
    silent?: boolean;
    directory?: string;
    resetOnClose?: boolean;
    configureBuckets?: { name: string; configs?: (string | Buffer)[] }[];
  }

  export default class S3rver {
    constructor(options?: S3rverOptions);
    run(): Promise<{ address: string; port: number }>;
    close(): Promise<void>;
  }
}
