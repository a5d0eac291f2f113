/// <reference lib="webworker" />
/** Runs and sweeps off the main thread; one job at a time; the page terminates the worker to cancel one. */
import { createMessageHandler } from './run-protocol';

declare const self: DedicatedWorkerGlobalScope;

const handle = createMessageHandler((reply, transfer) => self.postMessage(reply, { transfer }));
self.onmessage = (event: MessageEvent<unknown>) => handle(event.data);
