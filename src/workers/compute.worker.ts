/// <reference lib="webworker" />
/** Solves sheets off the page's thread so that typing never waits for the computation. */
import { prepareSheetReader } from '../lib/sheet/schema';
import { createComputeHandler } from './compute-protocol';

const scope = self as unknown as DedicatedWorkerGlobalScope;
// The page starts this worker once it has painted, before the first edit: the sheet reader is made meanwhile, not on that edit.
setTimeout(prepareSheetReader, 0);
const handle = createComputeHandler((reply) => scope.postMessage(reply));
scope.onmessage = (event: MessageEvent<unknown>) => handle(event.data);
