import { QueryClient, notifyManager } from '@tanstack/react-query';

// An answer reaches the components in the task that received it rather than in a setTimeout of its own (TanStack's
// default): on a busy page that task waited behind others, and a frame drawn meanwhile showed the old rows. A microtask
// still batches every update made in the same task.
notifyManager.setScheduler(queueMicrotask);

/**
 * The one query policy of every island:
 * - no retries: the API's answers are final (a 4xx will not change), and a failure shows its message at once;
 * - no refetch on window focus: editors hold unsaved input, and lists refresh after the island's own changes;
 * - stale at once (stale time 0): a remount or an invalidation always asks the server again.
 */
export function createQueryClient(): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: { retry: false, refetchOnWindowFocus: false, staleTime: 0 },
      mutations: { retry: false },
    },
  });
}
