/// <reference lib="webworker" />
/** Runs and sweeps off the main thread; one job per worker, which the page terminates to cancel. */
import { performJob } from './run-protocol';

declare const self: DedicatedWorkerGlobalScope;

self.onmessage = (event: MessageEvent<unknown>) => {
  performJob(event.data, (reply, transfer) => self.postMessage(reply, { transfer }));
};
