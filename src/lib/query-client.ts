import { QueryClient } from '@tanstack/react-query';

/**
 * The one factory for TanStack Query clients. Run data does not change once analysed, so a
 * generous stale time avoids refetching charts on every focus.
 */
export function createQueryClient(): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: { staleTime: 60_000, gcTime: 10 * 60_000, refetchOnWindowFocus: false, retry: 1 },
    },
  });
}
