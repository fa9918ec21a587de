import { MutationCache, QueryClient } from '@tanstack/vue-query'
import { isDatabaseUnavailable, retryDelayMs, shouldRetryRead } from './retryPolicy'

/**
 * One client for the app; the router guard uses it too, to drop cached data when a session ends.
 * Reads retry by themselves through an outage (retryPolicy.ts). Writes never retry on their own:
 * a change is made once, by the person; when the database was down, every screen shows that the
 * last change was not saved (AppUnsavedAlert), and the next change that goes through clears it.
 */
export const queryClient = new QueryClient({
  mutationCache: new MutationCache({
    // Imported on first use: the sign-in page's script stays within its 120 kB budget.
    onError: (error) => {
      if (isDatabaseUnavailable(error)) void import('@/stores/outage').then((m) => m.useOutageStore().writeFailed())
    },
    onSuccess: () => void import('@/stores/outage').then((m) => m.useOutageStore().clear()),
  }),
  defaultOptions: {
    queries: { staleTime: 10_000, retry: shouldRetryRead, retryDelay: retryDelayMs, refetchOnWindowFocus: true },
    mutations: { retry: false },
  },
})
