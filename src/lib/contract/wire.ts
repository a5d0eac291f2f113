/**
 * What crosses the wire between the server and the browser. Contract types describe the values the
 * server builds; `Wire<T>` is the same value after `Response.json`, as the islands receive it.
 */

/** `T` as the browser receives it after JSON: dates arrive as ISO strings, everything else as is. */
export type Wire<T> = T extends Date
  ? string
  : T extends readonly (infer Item)[]
    ? Wire<Item>[]
    : T extends object
      ? { [Key in keyof T]: Wire<T[Key]> }
      : T;

/** A located problem in a request, as error bodies list them (e.g. every issue of a sheet document). */
export interface ErrorIssue {
  message: string;
  path?: string;
  line?: number;
  column?: number;
}

/**
 * Every error response: `{ error: { message, path?, issues?, ...extra } }`. Extra fields travel
 * unchanged (the stale save's `latest`, see `StaleSaveError`).
 */
export interface ErrorBody {
  error: {
    message: string;
    /** The request field the error is about, e.g. "document.hand.fingers[0]" or "email". */
    path?: string;
    issues?: ErrorIssue[];
    [extra: string]: unknown;
  };
}
