/**
 * The invented staff directory of the demo hospital, served by the fake identity provider that
 * `npm start` and the tests run (scripts/lib/fakeIdentityProvider.ts). Listed in the README.
 * Nobody here is a real person; every address is on the reserved .test domain.
 */
export interface DirectoryPerson {
  /** The directory's stable subject identifier (the `sub` claim). */
  sub: string
  email: string
  name: string
  /** Demo only: the password typed on the fake provider's sign-in page. */
  password: string
  groups: string[]
}

export const DEMO_DIRECTORY_PASSWORD = 'kestrel-directory-2026'

/** Directory groups of the demo hospital and what Ferrolane makes of them (OIDC_GROUP_ROLES). */
export const DEMO_GROUP_ROLES: Record<string, 'admin' | 'nurse' | 'doctor' | 'surgeon'> = {
  'KVGH-Anaemia-Nurses': 'nurse',
  'KVGH-Anaemia-Doctors': 'doctor',
  'KVGH-Surgeons': 'surgeon',
  'KVGH-Ferrolane-Admins': 'admin',
}

/** The same mapping as the OIDC_GROUP_ROLES text `npm start` passes to the server. */
export const DEMO_GROUP_ROLES_SETTING = Object.entries(DEMO_GROUP_ROLES)
  .map(([g, r]) => `${g}=${r}`)
  .join(',')

export const DEMO_DIRECTORY: DirectoryPerson[] = [
  {
    sub: 'kvgh-10417',
    email: 'r.achterberg@kestrelvale.ferrolane.test',
    name: 'Rosa Achterberg',
    password: DEMO_DIRECTORY_PASSWORD,
    groups: ['KVGH-All-Staff', 'KVGH-Anaemia-Nurses'],
  },
  {
    sub: 'kvgh-10533',
    email: 'm.oyelaran@kestrelvale.ferrolane.test',
    name: 'Dr Malik Oyelaran',
    password: DEMO_DIRECTORY_PASSWORD,
    groups: ['KVGH-All-Staff', 'KVGH-Anaemia-Doctors'],
  },
  {
    sub: 'kvgh-10688',
    email: 'e.strand@kestrelvale.ferrolane.test',
    name: 'Ms Elin Strand',
    password: DEMO_DIRECTORY_PASSWORD,
    groups: ['KVGH-All-Staff', 'KVGH-Surgeons'],
  },
  {
    sub: 'kvgh-10702',
    email: 'c.duvall@kestrelvale.ferrolane.test',
    name: 'Cormac Duvall',
    password: DEMO_DIRECTORY_PASSWORD,
    groups: ['KVGH-All-Staff', 'KVGH-IT', 'KVGH-Ferrolane-Admins'],
  },
  // In the directory but in no group Ferrolane knows: refused with a clear page.
  {
    sub: 'kvgh-10815',
    email: 'p.havel@kestrelvale.ferrolane.test',
    name: 'Pavla Havel (porter)',
    password: DEMO_DIRECTORY_PASSWORD,
    groups: ['KVGH-All-Staff', 'KVGH-Portering'],
  },
]

/** The demo client Ferrolane is registered as at the fake provider. */
export const DEMO_OIDC_CLIENT = { clientId: 'ferrolane-demo', clientSecret: 'ferrolane-demo-client-secret-not-for-production' }
