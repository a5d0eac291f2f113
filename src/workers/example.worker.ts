/// <reference lib="webworker" />
/** Solves a worked example's sheet off the page's thread and prepares what its calculator shows. */
import { computeExample } from './example-protocol';

const scope = self as unknown as DedicatedWorkerGlobalScope;
scope.onmessage = (event: MessageEvent<unknown>) => {
  scope.postMessage(computeExample(event.data));
};
