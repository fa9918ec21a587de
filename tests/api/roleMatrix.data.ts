import type { Role } from '../../shared/roles'

export type Allow = 'public' | 'signed-in' | Role[]
export interface MatrixEntry { method: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE'; path: string; allow: Allow }

/**
 * Who may call each API route. This table is the specification: a route that is mounted
 * but missing here fails the role-matrix test, and so does a route here that is not mounted.
 */
export const ROLE_MATRIX: MatrixEntry[] = [
  { method: 'GET', path: '/api/health', allow: 'public' },
  { method: 'GET', path: '/api/auth/csrf', allow: 'public' },
  { method: 'POST', path: '/api/auth/login', allow: 'public' },
  { method: 'POST', path: '/api/auth/logout', allow: 'signed-in' },
  { method: 'GET', path: '/api/auth/me', allow: 'signed-in' },
  { method: 'POST', path: '/api/auth/password', allow: 'signed-in' },
  { method: 'GET', path: '/api/users', allow: ['admin'] },
  { method: 'POST', path: '/api/users', allow: ['admin'] },
  { method: 'PATCH', path: '/api/users/:id', allow: ['admin'] },
  { method: 'POST', path: '/api/users/:id/reset-password', allow: ['admin'] },
]
