import type { Role } from '../../shared/roles'

/** Demo only; listed in the README. Never used outside the demo scenario. */
export const DEMO_PASSWORD = 'ferrolane-demo-2026'

export interface DemoStaff {
  email: string
  name: string
  role: Role
}

export const DEMO_ACCOUNTS: DemoStaff[] = [
  { email: 'admin@ferrolane.test', name: 'Priya Anand', role: 'admin' },
  { email: 'nurse@ferrolane.test', name: 'Tom Okafor', role: 'nurse' },
  { email: 'doctor@ferrolane.test', name: 'Dr Helen Marsh', role: 'doctor' },
  { email: 'surgeon@ferrolane.test', name: 'Ms Ruth Calder', role: 'surgeon' },
]

/** A few more invented colleagues so lists look like a real service. */
export const DEMO_COLLEAGUES: DemoStaff[] = [
  { email: 'g.ferreira@ferrolane.test', name: 'Gabriela Ferreira', role: 'nurse' },
  { email: 'a.lindqvist@ferrolane.test', name: 'Dr Anders Lindqvist', role: 'doctor' },
  { email: 'k.mensah@ferrolane.test', name: 'Mr Kwame Mensah', role: 'surgeon' },
  { email: 'j.whitlow@ferrolane.test', name: 'Mr James Whitlow', role: 'surgeon' },
]
