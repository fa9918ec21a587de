/**
 * A local OpenID provider for the demo and the tests, built on `oidc-provider` (a maintained,
 * certified provider library): discovery, a sign-in form checking the directory password, a
 * consent page, PKCE-only code flow, ID tokens, userinfo and RP-initiated logout. Ferrolane talks
 * to it only through OIDC_ISSUER and the standard protocol, as it would to a hospital's directory.
 */
import http from 'node:http'
import { generateKeyPairSync, randomBytes } from 'node:crypto'
import type { AddressInfo } from 'node:net'
import Provider, { type Configuration } from 'oidc-provider'
import type { DirectoryPerson } from '../../seed/demo/directory'
import { consentPage, errorPage, loginPage, logoutPage, signedOutPage } from './fakeIdentityPages'

export interface FakeClient {
  clientId: string
  clientSecret: string
  redirectUris: string[]
  postLogoutRedirectUris: string[]
}

export interface FakeIdentityProvider {
  issuer: string
  port: number
  stop(): Promise<void>
}

export interface FakeIdentityOptions {
  /** 0 picks a free port (the tests); `npm start` uses OIDC_FAKE_PORT, default 9090. */
  port: number
  host?: string
  /** Read at every sign-in, so a test can change someone's groups between two sign-ins. */
  directory: DirectoryPerson[]
  clients: FakeClient[]
}

const SCOPE_CLAIMS = { openid: ['sub'], email: ['email', 'email_verified'], profile: ['name'], groups: ['groups'] }

function readForm(req: http.IncomingMessage): Promise<URLSearchParams> {
  return new Promise((resolve, reject) => {
    let body = ''
    req.setEncoding('utf8')
    req.on('data', (chunk: string) => {
      body += chunk
      if (body.length > 10_000) req.destroy(new Error('form too large'))
    })
    req.on('end', () => resolve(new URLSearchParams(body)))
    req.on('error', reject)
  })
}

function sendHtml(res: http.ServerResponse, status: number, html: string): void {
  res.writeHead(status, { 'content-type': 'text/html; charset=utf-8', 'cache-control': 'no-store' })
  res.end(html)
}

function configuration(opts: FakeIdentityOptions): Configuration {
  const { privateKey } = generateKeyPairSync('rsa', { modulusLength: 2048 })
  return {
    clients: opts.clients.map((c) => ({
      client_id: c.clientId,
      client_secret: c.clientSecret,
      client_name: 'Ferrolane',
      redirect_uris: c.redirectUris,
      post_logout_redirect_uris: c.postLogoutRedirectUris,
      grant_types: ['authorization_code'],
      response_types: ['code'],
      token_endpoint_auth_method: 'client_secret_basic',
    })),
    jwks: { keys: [{ ...privateKey.export({ format: 'jwk' }), kid: 'fake-directory-1', use: 'sig', alg: 'RS256' }] as never },
    cookies: { keys: [randomBytes(32).toString('hex')] },
    claims: SCOPE_CLAIMS,
    // Every claim in the ID token as well as at userinfo, as many hospital directories do.
    conformIdTokenClaims: false,
    pkce: { required: () => true },
    features: {
      devInteractions: { enabled: false },
      rpInitiatedLogout: {
        enabled: true,
        logoutSource: async (ctx, form) => {
          ctx.type = 'html'
          ctx.body = logoutPage(form)
        },
        postLogoutSuccessSource: async (ctx) => {
          ctx.type = 'html'
          ctx.body = signedOutPage()
        },
      },
    },
    renderError: async (ctx, out) => {
      ctx.type = 'html'
      ctx.body = errorPage(String(out.error_description ?? out.error))
    },
    findAccount: async (_ctx, sub) => {
      const person = opts.directory.find((p) => p.sub === sub)
      if (!person) return undefined
      return {
        accountId: sub,
        claims: async () => ({ sub, email: person.email, email_verified: true, name: person.name, groups: [...person.groups] }),
      }
    },
    ttl: { AccessToken: 600, AuthorizationCode: 60, IdToken: 600, Interaction: 600, Session: 8 * 3600, Grant: 8 * 3600 },
  }
}

async function interaction(
  provider: Provider,
  opts: FakeIdentityOptions,
  req: http.IncomingMessage,
  res: http.ServerResponse,
  action: string,
): Promise<void> {
  const details = await provider.interactionDetails(req, res)
  const clientName = 'Ferrolane'
  if (req.method === 'GET') {
    const scopes = String(details.params.scope ?? '')
      .split(' ')
      .filter(Boolean)
    return sendHtml(
      res,
      200,
      details.prompt.name === 'login' ? loginPage(details.uid, clientName) : consentPage(details.uid, clientName, scopes),
    )
  }
  if (action === 'login') {
    const form = await readForm(req)
    const email = (form.get('login') ?? '').trim().toLowerCase()
    const person = opts.directory.find((p) => p.email === email && p.password === form.get('password'))
    if (!person) return sendHtml(res, 200, loginPage(details.uid, clientName, 'That e-mail and password are not in the directory.', email))
    return provider.interactionFinished(req, res, { login: { accountId: person.sub } }, { mergeWithLastSubmission: false })
  }
  if (action === 'confirm') {
    const { accountId } = details.session ?? {}
    const grant = details.grantId
      ? await provider.Grant.find(details.grantId)
      : new provider.Grant({ accountId, clientId: details.params.client_id as string })
    const missing = details.prompt.details as { missingOIDCScope?: string[]; missingOIDCClaims?: string[] }
    if (missing.missingOIDCScope) grant!.addOIDCScope(missing.missingOIDCScope.join(' '))
    if (missing.missingOIDCClaims) grant!.addOIDCClaims(missing.missingOIDCClaims)
    const grantId = await grant!.save()
    return provider.interactionFinished(req, res, { consent: { grantId } }, { mergeWithLastSubmission: true })
  }
  if (action === 'abort') {
    return provider.interactionFinished(
      req,
      res,
      { error: 'access_denied', error_description: 'The user did not allow access' },
      { mergeWithLastSubmission: false },
    )
  }
  sendHtml(res, 404, errorPage('No such page'))
}

export async function startFakeIdentityProvider(opts: FakeIdentityOptions): Promise<FakeIdentityProvider> {
  const host = opts.host ?? '127.0.0.1'
  let handle: http.RequestListener = (_req, res) => sendHtml(res, 503, errorPage('Starting'))
  const server = http.createServer((req, res) => handle(req, res))
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject)
    server.listen(opts.port, host, () => resolve())
  })
  const port = (server.address() as AddressInfo).port
  const issuer = `http://${host}:${port}`
  const provider = new Provider(issuer, configuration(opts))
  const oidc = provider.callback()
  handle = (req, res) => {
    const m = /^\/interaction\/([\w-]+)(?:\/(login|confirm|abort))?$/.exec((req.url ?? '').split('?')[0])
    if (!m) return void oidc(req, res)
    interaction(provider, opts, req, res, m[2] ?? '').catch((err: unknown) => {
      if (!res.headersSent) sendHtml(res, 400, errorPage(err instanceof Error ? err.message : 'The sign-in could not continue'))
    })
  }
  return {
    issuer,
    port,
    stop: async () => {
      server.closeAllConnections()
      await new Promise((r) => server.close(r))
    },
  }
}
