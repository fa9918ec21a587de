import { describe, expect, it } from 'vitest'
import { loadConfig } from '../../server/config'
import { roleForGroups } from '../../server/services/directorySignIn'

const base = {
  SESSION_SECRET: 'a-test-secret-of-enough-length',
  OIDC_ISSUER: 'https://login.hospital.test/realm',
  OIDC_CLIENT_ID: 'ferrolane',
}

describe('directory sign-in configuration', () => {
  it('when OIDC_GROUP_ROLES lists groups, then they keep their order and the first group held decides', () => {
    const config = loadConfig({ ...base, OIDC_GROUP_ROLES: 'Nurses=nurse, Admins = admin ,Surgeons=surgeon' })
    expect(config.oidc?.groupRoles).toEqual([
      ['Nurses', 'nurse'],
      ['Admins', 'admin'],
      ['Surgeons', 'surgeon'],
    ])
    expect(roleForGroups(config.oidc!.groupRoles, ['Surgeons', 'Admins'])).toBe('admin')
    expect(roleForGroups(config.oidc!.groupRoles, ['Porters'])).toBeNull()
    expect(roleForGroups(config.oidc!.groupRoles, [])).toBeNull()
  })

  it('when a group maps to an unknown role or nothing is mapped, then the server refuses to start', () => {
    expect(() => loadConfig({ ...base, OIDC_GROUP_ROLES: 'Nurses=matron' })).toThrow(/OIDC_GROUP_ROLES/)
    expect(() => loadConfig({ ...base, OIDC_GROUP_ROLES: '' })).toThrow(/at least one directory group/)
    expect(() => loadConfig({ ...base, OIDC_CLIENT_ID: '', OIDC_GROUP_ROLES: 'A=nurse' })).toThrow(/OIDC_CLIENT_ID/)
    expect(() => loadConfig({ ...base, OIDC_SCOPES: 'email', OIDC_GROUP_ROLES: 'A=nurse' })).toThrow(/openid/)
  })

  it('when no issuer is set, then directory sign-in is off and local sign-in must stay on', () => {
    const config = loadConfig({ SESSION_SECRET: base.SESSION_SECRET })
    expect(config.oidc).toBeNull()
    expect(config.localSignIn).toBe('on')
    expect(config.adminSecondFactorRequired).toBe(true)
    expect(() => loadConfig({ SESSION_SECRET: base.SESSION_SECRET, LOCAL_SIGN_IN: 'admins-only' })).toThrow(/needs OIDC_ISSUER/)
  })

  it('when the redirect URIs are not set, then they derive from PUBLIC_URL', () => {
    const config = loadConfig({ ...base, OIDC_GROUP_ROLES: 'A=nurse', PUBLIC_URL: 'https://ferrolane.hospital.test/' })
    expect(config.oidc?.redirectUri).toBe('https://ferrolane.hospital.test/api/auth/oidc/callback')
    expect(config.oidc?.postLogoutRedirectUri).toBe('https://ferrolane.hospital.test/sign-in?signedOut=1')
  })
})
