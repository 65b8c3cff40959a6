/**
 * The one way an island keeps a server answer fresh: SWR with a fixed poll, the previous answer kept
 * while the next loads, and a steady retry. SWR on its own pauses polling while errored and backs
 * off exponentially; a board or a queue must come back on its own within seconds once the server
 * answers again, so errors retry every `retryMs` instead.
 */
import useSWR, { type SWRResponse } from 'swr';
import { fetchJson } from '~/lib/client/fetch-json.ts';

export const POLL_RETRY_MS = 5_000;

export interface PollOptions<T> {
  /** The server-rendered first answer (shown at once, replaced by the first poll). */
  fallbackData?: T;
  /** Keep the last answer on screen while a new key loads (a filter change, another page). Default true. */
  keepPreviousData?: boolean;
  revalidateOnFocus?: boolean;
  retryMs?: number;
  /** How to read the key; default GET as JSON. */
  fetcher?: (key: string) => Promise<T>;
}

/** `key` null: nothing is fetched (the caller may not need it, e.g. a list only one role sees). */
export function usePolled<T>(key: string | null, pollMs: number, options: PollOptions<T> = {}): SWRResponse<T> {
  const {
    fallbackData,
    keepPreviousData = true,
    revalidateOnFocus,
    retryMs = POLL_RETRY_MS,
    fetcher = fetchJson<T>,
  } = options;
  return useSWR<T>(key, fetcher, {
    fallbackData,
    keepPreviousData,
    refreshInterval: pollMs,
    ...(revalidateOnFocus === undefined ? {} : { revalidateOnFocus }),
    onErrorRetry: (_err, _key, _config, revalidate, { retryCount }) => {
      setTimeout(() => revalidate({ retryCount }), retryMs);
    },
  });
}
