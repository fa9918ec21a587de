import { MutationCache, QueryClient } from '@tanstack/vue-query'
import { useOutageStore } from '@/stores/outage'
import { isDatabaseUnavailable, retryDelayMs, shouldRetryRead } from './retryPolicy'

/**
 * One client for the app; the router guard uses it too, to load the session once.
 * Reads retry by themselves through an outage (retryPolicy.ts). Writes never retry on their own:
 * a change is made once, by the person; when the database was down, every screen shows that the
 * last change was not saved (AppUnsavedAlert), and the next change that goes through clears it.
 */
export const queryClient = new QueryClient({
  mutationCache: new MutationCache({
    onError: (error) => {
      if (isDatabaseUnavailable(error)) useOutageStore().writeFailed()
    },
    onSuccess: () => useOutageStore().clear(),
  }),
  defaultOptions: {
    queries: { staleTime: 10_000, retry: shouldRetryRead, retryDelay: retryDelayMs, refetchOnWindowFocus: true },
    mutations: { retry: false },
  },
})
