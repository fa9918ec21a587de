/** A small cookie-keeping HTTP client for the cluster test: one signed-in person, as the browser app behaves. */
export interface Outcome {
  at: number
  op: string
  status: number
}

export class Visitor {
  private cookie = ''
  csrf = ''

  constructor(
    private readonly base: string,
    private readonly log: Outcome[],
  ) {}

  /** T is the answer the caller expects on success; on any other status the body may be an error, text or null. */
  async call<T = unknown>(op: string, method: string, path: string, body?: unknown, form?: FormData): Promise<{ status: number; body: T }> {
    const headers: Record<string, string> = {}
    if (this.cookie) headers.cookie = this.cookie
    if (method !== 'GET' && this.csrf) headers['x-csrf-token'] = this.csrf
    if (body !== undefined) headers['content-type'] = 'application/json'
    let status: number
    let parsed: unknown = null
    try {
      const res = await fetch(this.base + path, {
        method,
        headers,
        body: form ?? (body === undefined ? undefined : JSON.stringify(body)),
        signal: AbortSignal.timeout(30_000),
      })
      status = res.status
      const set = res.headers.getSetCookie()
      if (set.length) this.cookie = set.map((c) => c.split(';')[0]).join('; ')
      const text = await res.text()
      try {
        parsed = JSON.parse(text)
      } catch {
        parsed = text
      }
    } catch {
      status = 599 // no answer at all (connection refused or reset): counted with the 5xx
    }
    this.log.push({ at: Date.now(), op, status })
    return { status, body: parsed as T }
  }

  async signIn(email: string, password: string): Promise<number> {
    const c = await this.call<{ csrfToken: string }>('csrf', 'GET', '/api/auth/csrf')
    if (c.status !== 200) return c.status
    this.csrf = c.body.csrfToken
    const r = await this.call<{ csrfToken: string }>('sign-in', 'POST', '/api/auth/login', { email, password })
    if (r.status === 200) this.csrf = r.body.csrfToken
    return r.status
  }
}
