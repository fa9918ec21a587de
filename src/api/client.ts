import type { CsrfTokenAnswer } from '@shared/auth/views'
import type { ApiErrorBody } from '@shared/types'
import { parseRetryAfter } from './retryAfter'

/** A failed API call, carrying the server's error code and per-field messages. */
export class ApiError extends Error {
  override readonly name = 'ApiError'
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields: Record<string, string> = {},
    /** Facts to act on, e.g. the free slots offered with a full infusion session. */
    readonly details: Record<string, unknown> = {},
    /** The server's Retry-After, in ms, when it gave one (503 during a database outage). */
    readonly retryAfterMs?: number,
  ) {
    super(message)
  }
}

export function isApiError(error: unknown, code?: string): error is ApiError {
  return error instanceof ApiError && (code === undefined || error.code === code)
}

type Method = 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE'

/** Called when the server says the session is gone (401) or a new password is due (403). */
type AuthFailureHandler = (error: ApiError) => void
let onAuthFailure: AuthFailureHandler | undefined
export function setAuthFailureHandler(handler: AuthFailureHandler): void {
  onAuthFailure = handler
}

// The CSRF token belongs to the session; the server regenerates the session at sign-in.
let csrfToken: string | null = null
export function setCsrfToken(token: string | null): void {
  csrfToken = token
}

async function ensureCsrfToken(): Promise<string> {
  if (!csrfToken) {
    const { csrfToken: fresh } = await send<CsrfTokenAnswer>('GET', '/auth/csrf')
    csrfToken = fresh
  }
  return csrfToken
}

async function toApiError(response: Response): Promise<ApiError> {
  const body = (await response.json().catch(() => null)) as Partial<ApiErrorBody> | null
  const error = body?.error
  const retryAfterMs = parseRetryAfter(response.headers.get('Retry-After'))
  if (error && typeof error.code === 'string') {
    return new ApiError(
      response.status,
      error.code,
      error.message ?? 'Request failed',
      error.fields ?? {},
      error.details ?? {},
      retryAfterMs,
    )
  }
  // A proxy or a crashed server answers without our error shape.
  const message = response.status >= 500 ? 'The server is not answering properly. Try again in a moment.' : 'Request failed'
  return new ApiError(response.status, `http_${response.status}`, message, {}, {}, retryAfterMs)
}

/**
 * The last ETag seen per polled path. Answers carry `Cache-Control: no-store`, so the browser keeps
 * no copy and never revalidates by itself: the poll sends If-None-Match and, on a 304, keeps the
 * data its query already holds. Only tags are kept here, never patient data.
 */
const etags = new Map<string, string>()
const MAX_ETAGS = 200
/** The answer was 304 Not Modified: the caller's copy is still current. */
const NOT_MODIFIED = Symbol('not-modified')

async function send<T>(method: Method, path: string, body?: unknown, extra: Record<string, string> = {}): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json', ...extra }
  // A FormData body (file upload) sets its own multipart Content-Type with the boundary.
  const isForm = typeof FormData !== 'undefined' && body instanceof FormData
  if (body !== undefined && !isForm) headers['Content-Type'] = 'application/json'
  if (method !== 'GET') headers['X-CSRF-Token'] = await ensureCsrfToken()

  let response: Response
  try {
    response = await fetch(`/api${path}`, {
      method,
      headers,
      credentials: 'same-origin',
      body: body === undefined ? undefined : isForm ? (body as FormData) : JSON.stringify(body),
    })
  } catch {
    throw new ApiError(0, 'network_error', 'Ferrolane cannot reach the server. Check the connection and try again.')
  }

  if (response.status === 304) return NOT_MODIFIED as T
  if (!response.ok) throw await toApiError(response)
  if (response.status === 204) return undefined as T
  const etag = method === 'GET' ? response.headers.get('ETag') : null
  if (etag) {
    etags.delete(path) // re-inserted last, so the oldest tags are the ones dropped
    if (etags.size >= MAX_ETAGS) etags.delete(etags.keys().next().value!)
    etags.set(path, etag)
  }
  return (await response.json()) as T
}

/**
 * A poll: asks only "has this changed?" when the caller still holds the previous answer, and
 * returns that same answer on a 304 (TanStack Query then keeps its data and re-renders nothing).
 */
async function getIfChanged<T>(path: string, previous: T | undefined, refetch: boolean): Promise<T> {
  const extra: Record<string, string> = refetch ? { 'X-Ferrolane-Refetch': '1' } : {}
  const etag = previous === undefined ? undefined : etags.get(path)
  if (etag) extra['If-None-Match'] = etag
  const answer = await request<T | typeof NOT_MODIFIED>('GET', path, undefined, extra)
  if (answer !== NOT_MODIFIED) return answer
  if (previous !== undefined) return previous
  // Not asked conditionally, so a 304 cannot come; ask again in full rather than return nothing.
  etags.delete(path)
  return request<T>('GET', path, undefined, refetch ? { 'X-Ferrolane-Refetch': '1' } : undefined)
}

async function request<T>(method: Method, path: string, body?: unknown, extra?: Record<string, string>): Promise<T> {
  try {
    return await send<T>(method, path, body, extra)
  } catch (error) {
    if (!(error instanceof ApiError)) throw error
    // A stale token (e.g. the session was renewed elsewhere): fetch a new one and retry once.
    if (error.code === 'csrf_invalid') {
      csrfToken = null
      return send<T>(method, path, body).catch((retryError: unknown) => {
        notify(retryError)
        throw retryError
      })
    }
    notify(error)
    throw error
  }
}

function notify(error: unknown): void {
  if (!(error instanceof ApiError)) return
  // A wrong password (at sign-in or when changing it) is not a lost session.
  if (error.code === 'invalid_credentials' || error.code === 'invalid_code') return
  if (error.status === 401 || error.code === 'password_change_required' || error.code === 'second_factor_enrolment_required')
    onAuthFailure?.(error)
}

export const api = {
  /**
   * `refetch`: the screen already shows this data and is re-reading it (a poll, a refetch on
   * focus). The server audits such reads once per window instead of every time.
   */
  get: <T>(path: string, opts: { refetch?: boolean } = {}) =>
    request<T>('GET', path, undefined, opts.refetch ? { 'X-Ferrolane-Refetch': '1' } : undefined),
  /** A polled read: conditional on the ETag of `previous`, the data the screen already shows. */
  poll: <T>(path: string, previous: T | undefined, opts: { refetch?: boolean } = {}) =>
    getIfChanged<T>(path, previous, opts.refetch ?? false),
  post: <T>(path: string, body?: unknown) => request<T>('POST', path, body ?? {}),
  patch: <T>(path: string, body: unknown) => request<T>('PATCH', path, body),
  put: <T>(path: string, body: unknown) => request<T>('PUT', path, body),
  delete: <T>(path: string) => request<T>('DELETE', path),
  /** multipart/form-data, for file uploads */
  postForm: <T>(path: string, form: FormData) => request<T>('POST', path, form),
}
