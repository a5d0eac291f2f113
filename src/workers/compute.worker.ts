/// <reference lib="webworker" />
/** Solves sheets off the page's thread so that typing never waits for the computation. */
import { computeSheet } from './compute-protocol';

const scope = self as unknown as DedicatedWorkerGlobalScope;
scope.onmessage = (event: MessageEvent<unknown>) => {
  scope.postMessage(computeSheet(event.data));
};
