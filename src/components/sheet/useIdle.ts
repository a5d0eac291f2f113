import { useEffect, useState } from 'react';

/** Runs once the page is idle (or after a short wait where idle callbacks do not exist); returns the cancel. */
export function whenIdle(run: () => void): () => void {
  if (typeof requestIdleCallback === 'function') {
    const handle = requestIdleCallback(run, { timeout: 2000 });
    return () => cancelIdleCallback(handle);
  }
  const handle = setTimeout(run, 200);
  return () => clearTimeout(handle);
}

/** Runs `run` once the frame after now has been painted (a task queued from the next animation frame); returns a cancel. */
export function afterNextPaint(run: () => void): () => void {
  let timer: ReturnType<typeof setTimeout> | undefined;
  const frame = requestAnimationFrame(() => {
    timer = setTimeout(run, 0);
  });
  return () => {
    cancelAnimationFrame(frame);
    if (timer !== undefined) clearTimeout(timer);
  };
}

/** False until the page has been idle once since mounting: code not needed to read and edit the sheet waits for it. */
export function useIdle(): boolean {
  const [idle, setIdle] = useState(false);
  useEffect(() => (idle ? undefined : whenIdle(() => setIdle(true))), [idle]);
  return idle;
}
