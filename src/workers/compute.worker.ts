/// <reference lib="webworker" />
/** Solves sheets off the page's thread so that typing never waits for the computation. */
import { createEditReader, prepareSheetReader } from '../lib/sheet/schema';
import { computeSheetInSteps } from './compute-protocol';

const scope = self as unknown as DedicatedWorkerGlobalScope;
// The page starts this worker once it has painted, before the first edit: the sheet reader is made meanwhile, not on that edit.
setTimeout(prepareSheetReader, 0);
// This worker's documents come from one editor, each an edit of the one before.
const readEdit = createEditReader();
let pendingGraspQuality: ReturnType<typeof setTimeout> | undefined;
scope.onmessage = (event: MessageEvent<unknown>) => {
  // A newer document makes the older one's grasp quality moot: the page keeps only the newest reply.
  clearTimeout(pendingGraspQuality);
  const { first, later } = computeSheetInSteps(event.data, () => performance.now(), readEdit);
  scope.postMessage(first);
  // After a turn of the event loop, so that a document the page sent meanwhile is read first.
  if (later) pendingGraspQuality = setTimeout(() => scope.postMessage(later()), 0);
};
