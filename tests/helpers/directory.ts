/**
 * The fake identity provider for a test file, on a free port, and a small cookie-keeping HTTP
 * walker that plays the browser at the provider: it follows redirects, fills the directory's
 * sign-in form, presses Allow, and stops at Ferrolane's callback URL.
 */
import { startFakeIdentityProvider, type FakeIdentityProvider } from '../../scripts/lib/fakeIdentityProvider'
import type { DirectoryPerson } from '../../seed/demo/directory'

export const TEST_CLIENT = { clientId: 'ferrolane-test', clientSecret: 'ferrolane-test-client-secret' }
export const TEST_GROUP_ROLES = 'Anaemia-Nurses=nurse,Anaemia-Doctors=doctor,Surgeons=surgeon,Ferrolane-Admins=admin'

export interface TestDirectory extends FakeIdentityProvider {
  people: DirectoryPerson[]
  /** Overrides that point a test app at this provider. */
  appEnv: Record<string, string>
}

/** `appUrl` is where the app answers (a served app's base URL, or a nominal one for Supertest). */
export async function startTestDirectory(people: DirectoryPerson[], appUrl = 'http://127.0.0.1:9'): Promise<TestDirectory> {
  const redirectUri = `${appUrl}/api/auth/oidc/callback`
  const postLogout = `${appUrl}/sign-in?signedOut=1`
  const idp = await startFakeIdentityProvider({
    port: 0,
    directory: people,
    clients: [{ ...TEST_CLIENT, redirectUris: [redirectUri], postLogoutRedirectUris: [postLogout] }],
  })
  return {
    ...idp,
    people,
    appEnv: {
      OIDC_ISSUER: idp.issuer,
      OIDC_CLIENT_ID: TEST_CLIENT.clientId,
      OIDC_CLIENT_SECRET: TEST_CLIENT.clientSecret,
      OIDC_REDIRECT_URI: redirectUri,
      OIDC_POST_LOGOUT_REDIRECT_URI: postLogout,
      OIDC_GROUP_ROLES: TEST_GROUP_ROLES,
      OIDC_DISPLAY_NAME: 'Test Hospital directory',
    },
  }
}

let counter = 0
export function person(groups: string[], overrides: Partial<DirectoryPerson> = {}): DirectoryPerson {
  counter += 1
  return {
    sub: `test-${counter}-${Date.now()}`,
    email: `dir${counter}.${Date.now()}@hospital.test`,
    name: `Directory person ${counter}`,
    password: 'directory-pass-1',
    groups,
    ...overrides,
  }
}

/** One browser's cookies at the provider (paths ignored: the provider is the only site it visits). */
export class ProviderBrowser {
  private jar = new Map<string, string>()
  /** Pages seen on the way, for assertions ("the sign-in form was shown"). */
  seen: string[] = []

  private async request(url: string, init: RequestInit = {}): Promise<Response> {
    const headers = new Headers(init.headers)
    if (this.jar.size) headers.set('cookie', [...this.jar].map(([k, v]) => `${k}=${v}`).join('; '))
    const res = await fetch(url, { ...init, headers, redirect: 'manual' })
    for (const c of res.headers.getSetCookie()) {
      const [pair, ...attrs] = c.split(';')
      const at = pair.indexOf('=')
      const expired = attrs.some((a) => /^\s*expires=Thu, 01 Jan 1970/i.test(a)) || pair.slice(at + 1) === ''
      if (expired) this.jar.delete(pair.slice(0, at))
      else this.jar.set(pair.slice(0, at), pair.slice(at + 1))
    }
    return res
  }

  /**
   * Follows `url` through the provider until it redirects to `stopAt`; signs in with `login`
   * when the form appears and presses the first button of any other form (Allow, Yes sign me out).
   */
  async walk(url: string, stopAt: string, login?: { email: string; password: string }, opts: { deny?: boolean } = {}): Promise<string> {
    let next: { url: string; init?: RequestInit } = { url }
    for (let step = 0; step < 20; step += 1) {
      const res = await this.request(next.url, next.init)
      const location = res.headers.get('location')
      if (res.status >= 300 && res.status < 400 && location) {
        const target = new URL(location, next.url).href
        if (target.startsWith(stopAt)) return target
        next = { url: target }
        continue
      }
      const html = await res.text()
      if (res.status !== 200) throw new Error(`provider answered ${res.status}: ${html.slice(0, 300)}`)
      this.seen.push(/<h1>(.*?)<\/h1>/.exec(html)?.[1] ?? '(no heading)')
      const forms = [...html.matchAll(/<form[^>]*action="([^"]+)"[^>]*>([\s\S]*?)<\/form>/g)]
      // "Do not allow" is the consent page's second form.
      const form = opts.deny && forms.length > 1 ? forms[forms.length - 1] : forms[0]
      if (!form) throw new Error(`no form on the provider page: ${html.slice(0, 300)}`)
      const body = new URLSearchParams()
      for (const m of form[2].matchAll(/<input[^>]*type="hidden"[^>]*name="([^"]+)"[^>]*value="([^"]*)"/g)) body.set(m[1], m[2])
      if (/name="login"/.test(form[2])) {
        if (!login) throw new Error('the provider asked for a sign-in and no credentials were given')
        body.set('login', login.email)
        body.set('password', login.password)
      }
      if (/name="logout"/.test(html)) body.set('logout', 'yes')
      const action = new URL(form[1].replace(/&amp;/g, '&'), next.url).href
      next = { url: action, init: { method: 'POST', body, headers: { 'content-type': 'application/x-www-form-urlencoded' } } }
    }
    throw new Error('too many steps at the provider')
  }
}
