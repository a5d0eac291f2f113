/// <reference lib="webworker" />
/**
 * Compares a local log file with a sheet off the page's thread. The worker lives on between
 * comparisons (later ones use code the engine has already optimised); a cancel message stops the
 * running one at its next chunk, since reading the file yields between chunks.
 */
import { performLogCompare } from './log-compare-protocol';

declare const self: DedicatedWorkerGlobalScope;

let running: AbortController | null = null;

self.onmessage = (event: MessageEvent<unknown>) => {
  const message = event.data as { type?: unknown } | null;
  if (message?.type === 'cancel') {
    running?.abort();
    return;
  }
  running?.abort();
  const controller = new AbortController();
  running = controller;
  void performLogCompare(message, (reply) => self.postMessage(reply), { signal: controller.signal }).finally(() => {
    if (running === controller) running = null;
  });
};
