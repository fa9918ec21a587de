import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { startTestDirectory, person, ProviderBrowser, type TestDirectory } from '../helpers/directory'
import { AuditEntry, User } from '../../server/models/index'
import type { DirectoryPerson } from '../../seed/demo/directory'

let idp: TestDirectory
let t: TestApp
const people: DirectoryPerson[] = []

beforeAll(async () => {
  idp = await startTestDirectory(people)
  t = makeTestApp(idp.appEnv)
})
afterAll(async () => {
  await t?.close()
  await idp?.stop()
})
beforeEach(async () => {
  await cleanDatabase(t.sequelize)
  people.length = 0
})

function cookieOf(res: { headers: Record<string, unknown> }): string | undefined {
  return ((res.headers['set-cookie'] as string[] | undefined) ?? []).find((c) => c.startsWith('ferrolane.sid='))?.split(';')[0]
}

/** Starts at Ferrolane, signs in at the provider, and returns the callback URL the provider sent back. */
async function throughProvider(c: Client, browser: ProviderBrowser, who?: DirectoryPerson) {
  const start = await c.agent.get('/api/auth/oidc/start').expect(303)
  const authUrl = new URL(start.headers.location)
  expect(authUrl.origin).toBe(idp.issuer)
  const callbackUrl = await browser.walk(authUrl.href, idp.appEnv.OIDC_REDIRECT_URI, who && { email: who.email, password: who.password })
  return { start, authUrl, callback: new URL(callbackUrl) }
}

async function signInAs(who: DirectoryPerson, c = new Client(t.app), browser = new ProviderBrowser()) {
  const { start, authUrl, callback } = await throughProvider(c, browser, who)
  const done = await c.agent.get(callback.pathname + callback.search)
  return { c, browser, start, authUrl, callback, done }
}

describe('directory sign-in (OpenID Connect against the fake provider)', () => {
  it('then GET /api/auth/providers offers the directory by its name and the local form', async () => {
    const res = await new Client(t.app).get('/api/auth/providers').expect(200)
    expect(res.body).toEqual({ local: 'on', directory: { name: 'Test Hospital directory', startUrl: '/api/auth/oidc/start' } })
  })

  it('then the authorization request carries state, nonce and an S256 PKCE challenge', async () => {
    const start = await new Client(t.app).agent.get('/api/auth/oidc/start').expect(303)
    const q = new URL(start.headers.location).searchParams
    expect(q.get('response_type')).toBe('code')
    expect(q.get('code_challenge_method')).toBe('S256')
    expect(q.get('code_challenge')).toMatch(/^[\w-]{43}$/)
    expect(q.get('state')).toBeTruthy()
    expect(q.get('nonce')).toBeTruthy()
    expect(q.get('scope')).toBe('openid email profile groups')
  })

  it(
    'when a nurse in the nurses group signs in for the first time, then an account is created, the session id changes and it is ' +
      'audited',
    async () => {
      const rosa = person(['All-Staff', 'Anaemia-Nurses'], { name: 'Rosa Test' })
      people.push(rosa)
      const { c, browser, start, done } = await signInAs(rosa)
      expect(browser.seen).toEqual(['Sign in to the staff directory', 'Allow access'])
      expect(done.status).toBe(303)
      expect(done.headers.location).toBe('/')
      expect(cookieOf(done)).toBeTruthy()
      expect(cookieOf(done)).not.toBe(cookieOf(start))
      const me = await c.get('/api/auth/me').expect(200)
      expect(me.body).toMatchObject({ email: rosa.email, name: 'Rosa Test', role: 'nurse', mustChangePassword: false })
      const user = await User.findOne({ where: { email: rosa.email }, raw: true })
      expect(user?.directorySubject).toBe(rosa.sub)
      const audits = await AuditEntry.findAll({ where: { userId: user!.id }, order: [['id', 'ASC']], raw: true })
      expect(audits.map((a) => `${a.action}:${a.entity}`)).toEqual(['create:user', 'sign-in:session'])
      expect(audits[1].after).toMatchObject({ via: 'directory' })
      // The nurse may now do nurse things, and only those.
      await c.get('/api/worklist').expect(200)
      await c.get('/api/users').expect(403)
    },
  )

  it('when the directory moves someone to another group, then the role follows at the next sign-in and the change is audited', async () => {
    const who = person(['Anaemia-Nurses'])
    people.push(who)
    const browser = new ProviderBrowser()
    await signInAs(who, new Client(t.app), browser)
    who.groups = ['Anaemia-Doctors']
    const second = await signInAs(who, new Client(t.app), browser)
    // The provider remembered this browser: no second password, only the callback.
    expect(browser.seen).toEqual(['Sign in to the staff directory', 'Allow access'])
    expect(second.done.headers.location).toBe('/')
    expect((await second.c.get('/api/auth/me').expect(200)).body.role).toBe('doctor')
    const change = await AuditEntry.findOne({ where: { action: 'update', entity: 'user' }, raw: true })
    expect(change?.before).toMatchObject({ role: 'nurse' })
    expect(change?.after).toMatchObject({ role: 'doctor', source: 'directory groups' })
  })

  it('when someone holds several mapped groups, then the first group listed in OIDC_GROUP_ROLES decides', async () => {
    const who = person(['Ferrolane-Admins', 'Surgeons'])
    people.push(who)
    const { c } = await signInAs(who)
    expect((await c.get('/api/auth/me').expect(200)).body.role).toBe('surgeon')
  })

  it('when a local account has the same e-mail, then it is matched, not duplicated, and its role follows the groups', async () => {
    const local = await makeStaff('nurse', { name: 'Local Nurse' })
    const who = person(['Surgeons'], { email: local.email })
    people.push(who)
    const { c } = await signInAs(who)
    expect((await c.get('/api/auth/me').expect(200)).body).toMatchObject({ id: local.id, role: 'surgeon', name: 'Local Nurse' })
    expect(await User.count({ where: { email: local.email } })).toBe(1)
  })

  it('when none of the groups maps to a role, then the sign-in is refused with the no-role page and nothing is created', async () => {
    const porter = person(['All-Staff', 'Portering'])
    people.push(porter)
    const { c, done } = await signInAs(porter)
    expect(done.status).toBe(303)
    expect(done.headers.location).toBe('/sign-in/refused?reason=no-role')
    await c.get('/api/auth/me').expect(401)
    expect(await User.count({ where: { email: porter.email } })).toBe(0)
    const refusal = await AuditEntry.findOne({ where: { action: 'sign-in-refused' }, raw: true })
    expect(refusal?.after).toMatchObject({ reason: 'no-role', email: porter.email })
  })

  it('when the account is deactivated in Ferrolane, then the directory cannot sign it in', async () => {
    const local = await makeStaff('doctor', { active: false })
    const who = person(['Anaemia-Doctors'], { email: local.email })
    people.push(who)
    const { c, done } = await signInAs(who)
    expect(done.headers.location).toBe('/sign-in/refused?reason=deactivated')
    await c.get('/api/auth/me').expect(401)
    expect(Boolean((await User.findByPk(local.id, { raw: true }))?.active)).toBe(false)
  })

  it('when the state is tampered with, then the code is not exchanged and nobody is signed in', async () => {
    const who = person(['Anaemia-Nurses'])
    people.push(who)
    const c = new Client(t.app)
    const { callback } = await throughProvider(c, new ProviderBrowser(), who)
    callback.searchParams.set('state', 'forged-state-value')
    const done = await c.agent.get(callback.pathname + callback.search)
    expect(done.headers.location).toBe('/sign-in/refused?reason=failed')
    await c.get('/api/auth/me').expect(401)
    expect(await User.count({ where: { email: who.email } })).toBe(0)
  })

  it('when a callback arrives in another browser (no pending sign-in), then it is refused as expired', async () => {
    const who = person(['Anaemia-Nurses'])
    people.push(who)
    const { callback } = await throughProvider(new Client(t.app), new ProviderBrowser(), who)
    const other = new Client(t.app)
    const done = await other.agent.get(callback.pathname + callback.search)
    expect(done.headers.location).toBe('/sign-in/refused?reason=expired')
    await other.get('/api/auth/me').expect(401)
  })

  it('when an authorization code is replayed, then it is refused both by Ferrolane and by the provider', async () => {
    const who = person(['Anaemia-Nurses'])
    people.push(who)
    const first = await signInAs(who)
    expect(first.done.headers.location).toBe('/')
    // The same callback again: the pending sign-in was used up.
    const again = await first.c.agent.get(first.callback.pathname + first.callback.search)
    expect(again.headers.location).toBe('/sign-in/refused?reason=expired')
    // The old code with a fresh, valid state: the provider refuses the used code (and the PKCE verifier differs).
    const c = new Client(t.app)
    const fresh = await throughProvider(c, new ProviderBrowser(), who)
    const replay = new URL(fresh.callback)
    replay.searchParams.set('code', first.callback.searchParams.get('code')!)
    const done = await c.agent.get(replay.pathname + replay.search)
    expect(done.headers.location).toBe('/sign-in/refused?reason=failed')
    await c.get('/api/auth/me').expect(401)
  })

  it('when the person presses "Do not allow" at the provider, then the sign-in is refused as cancelled', async () => {
    const who = person(['Anaemia-Nurses'])
    people.push(who)
    const c = new Client(t.app)
    const start = await c.agent.get('/api/auth/oidc/start').expect(303)
    const callback = new URL(
      await new ProviderBrowser().walk(
        start.headers.location,
        idp.appEnv.OIDC_REDIRECT_URI,
        { email: who.email, password: who.password },
        { deny: true },
      ),
    )
    expect(callback.searchParams.get('error')).toBe('access_denied')
    const done = await c.agent.get(callback.pathname + callback.search)
    expect(done.headers.location).toBe('/sign-in/refused?reason=cancelled')
  })

  it(
    'when a directory user signs out, then Ferrolane ends its session, sends ' + 'the browser to end the provider session, and audits it',
    async () => {
      const who = person(['Anaemia-Nurses'])
      people.push(who)
      const { c, browser } = await signInAs(who)
      await c.fetchCsrf()
      const out = await c.post('/api/auth/logout').expect(200)
      const end = new URL(out.body.endSessionUrl)
      expect(end.origin).toBe(idp.issuer)
      expect(end.searchParams.get('id_token_hint')).toBeTruthy()
      await c.get('/api/auth/me').expect(401)
      const back = await browser.walk(end.href, idp.appEnv.OIDC_POST_LOGOUT_REDIRECT_URI)
      expect(back).toBe(idp.appEnv.OIDC_POST_LOGOUT_REDIRECT_URI)
      expect(browser.seen.at(-1)).toBe('Sign out of the staff directory?')
      const audit = await AuditEntry.findOne({ where: { action: 'sign-out' }, raw: true })
      expect(audit?.after).toMatchObject({ via: 'directory', providerSignOut: true })
      // The provider forgot the browser: the next sign-in asks for the password again.
      browser.seen = []
      await signInAs(who, new Client(t.app), browser)
      expect(browser.seen[0]).toBe('Sign in to the staff directory')
    },
  )

  it('when a local user signs out, then the answer stays 204 with no provider step', async () => {
    const nurse = await makeStaff('nurse')
    const c = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
    await c.post('/api/auth/logout').expect(204)
  })
})

describe('without a directory configured', () => {
  it('then providers lists none and the OIDC routes answer 404', async () => {
    const plain = makeTestApp()
    try {
      const c = new Client(plain.app)
      expect((await c.get('/api/auth/providers').expect(200)).body).toEqual({ local: 'on', directory: null })
      const res = await c.get('/api/auth/oidc/start').expect(404)
      expect(res.body.error.code).toBe('not_found')
      await c.get('/api/auth/oidc/callback?code=x&state=y').expect(404)
    } finally {
      await plain.close()
      t.rebind()
    }
  })
})
