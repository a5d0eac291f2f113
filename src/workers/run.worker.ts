/// <reference lib="webworker" />
/** Runs and sweeps off the main thread; one job at a time; the page terminates the worker to cancel one. */
import { createMessageHandler } from './run-protocol';

declare const self: DedicatedWorkerGlobalScope;

// V8 compiles typed-array code without checks for detached buffers until some buffer is first detached; the first
// result's transfer then threw away every optimised function of the run, so the second run started cold. Detaching a
// throwaway buffer before any code is compiled spends that once, here.
const throwaway = new ArrayBuffer(8);
structuredClone(throwaway, { transfer: [throwaway] });

const handle = createMessageHandler((reply, transfer) => self.postMessage(reply, { transfer }));
self.onmessage = (event: MessageEvent<unknown>) => handle(event.data);
