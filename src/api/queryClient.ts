import { QueryClient } from '@tanstack/vue-query'
import { isApiError } from './client'

/** Client errors (4xx) will not change on a retry; network and server errors might. */
function shouldRetry(failureCount: number, error: unknown): boolean {
  if (isApiError(error) && error.status >= 400 && error.status < 500) return false
  return failureCount < 2
}

/** One client for the app; the router guard uses it too, to load the session once. */
export const queryClient = new QueryClient({
  defaultOptions: {
    queries: { staleTime: 10_000, retry: shouldRetry, refetchOnWindowFocus: true },
    mutations: { retry: false },
  },
})
