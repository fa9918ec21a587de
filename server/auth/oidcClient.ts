/**
 * The relying party, through openid-client v6 (a certified library): discovery, the
 * authorization URL with PKCE (S256), state and nonce, and the code exchange that checks all
 * three plus the ID token's signature, issuer, audience and expiry. Nothing here knows which
 * provider answers.
 */
import type * as client from 'openid-client'
import type { OidcConfig } from '../config'

/** What /start keeps in the session until the provider sends the browser back. */
export interface PendingDirectorySignIn {
  state: string
  nonce: string
  codeVerifier: string
  startedAt: number
}

export interface DirectoryIdentity {
  subject: string
  email: string | null
  emailVerified: boolean
  name: string | null
  groups: string[]
  idToken: string
}

// A plain-http issuer is accepted only on loopback: the local fake provider, never a real directory.
// Loaded on the first directory sign-in: a server with password sign-in only never needs it.
const openid = () => import('openid-client')

function isLoopback(issuer: URL): boolean {
  return ['127.0.0.1', 'localhost', '[::1]'].includes(issuer.hostname)
}

const discovered = new Map<string, Promise<client.Configuration>>()

function configurationFor(oidc: OidcConfig): Promise<client.Configuration> {
  const key = `${oidc.issuer} ${oidc.clientId}`
  let found = discovered.get(key)
  if (!found) {
    const issuer = new URL(oidc.issuer)
    found = openid().then((lib) =>
      lib.discovery(
        issuer,
        oidc.clientId,
        undefined,
        lib.ClientSecretBasic(oidc.clientSecret),
        issuer.protocol === 'http:' && isLoopback(issuer) ? { execute: [lib.allowInsecureRequests], timeout: 10 } : { timeout: 10 },
      ),
    )
    // A provider that was down is asked again next time instead of failing forever.
    found.catch(() => discovered.delete(key))
    discovered.set(key, found)
  }
  return found
}

export async function authorizationUrl(oidc: OidcConfig): Promise<{ url: string; pending: PendingDirectorySignIn }> {
  const config = await configurationFor(oidc)
  const client = await openid()
  const pending: PendingDirectorySignIn = {
    state: client.randomState(),
    nonce: client.randomNonce(),
    codeVerifier: client.randomPKCECodeVerifier(),
    startedAt: Date.now(),
  }
  const url = client.buildAuthorizationUrl(config, {
    redirect_uri: oidc.redirectUri,
    scope: oidc.scopes,
    response_type: 'code',
    state: pending.state,
    nonce: pending.nonce,
    code_challenge: await client.calculatePKCECodeChallenge(pending.codeVerifier),
    code_challenge_method: 'S256',
  })
  return { url: url.href, pending }
}

function groupsFrom(value: unknown): string[] {
  if (Array.isArray(value)) return value.filter((g): g is string => typeof g === 'string')
  if (typeof value === 'string') return [value]
  return []
}

/** Exchanges the code; throws when state, nonce, PKCE, the code or the ID token do not check out. */
export async function finishSignIn(oidc: OidcConfig, pending: PendingDirectorySignIn, query: string): Promise<DirectoryIdentity> {
  const config = await configurationFor(oidc)
  const client = await openid()
  // Built from the configured redirect URI, not the Host header, so it matches what was registered.
  const currentUrl = new URL(oidc.redirectUri)
  currentUrl.search = query
  const tokens = await client.authorizationCodeGrant(config, currentUrl, {
    pkceCodeVerifier: pending.codeVerifier,
    expectedState: pending.state,
    expectedNonce: pending.nonce,
    idTokenExpected: true,
  })
  const idClaims = tokens.claims()!
  // Some directories put e-mail and groups only at userinfo; its subject must match the ID token's.
  const info = config.serverMetadata().userinfo_endpoint ? await client.fetchUserInfo(config, tokens.access_token, idClaims.sub) : {}
  const claims: Record<string, unknown> = { ...idClaims, ...info }
  return {
    subject: idClaims.sub,
    email: typeof claims.email === 'string' ? claims.email.toLowerCase() : null,
    emailVerified: claims.email_verified !== false,
    name: typeof claims.name === 'string' ? claims.name : null,
    groups: groupsFrom(claims[oidc.rolesClaim]),
    idToken: tokens.id_token!,
  }
}

export async function endSessionUrl(oidc: OidcConfig, idToken: string): Promise<string | null> {
  const config = await configurationFor(oidc)
  if (!config.serverMetadata().end_session_endpoint) return null
  const client = await openid()
  return client.buildEndSessionUrl(config, { id_token_hint: idToken, post_logout_redirect_uri: oidc.postLogoutRedirectUri }).href
}
