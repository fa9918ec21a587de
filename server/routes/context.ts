import type { Request } from 'express'
import type { Sequelize } from 'sequelize'
import type { Config } from '../config'
import type { Actor } from '../services/audit'
import { clientAddress } from '../auth/passport'
import { Invalid } from '../errors'

/** What every route module needs from the app. */
export interface AppContext {
  config: Config
  sequelize: Sequelize
}

export function actorOf(req: Request): Actor {
  return {
    userId: req.user?.id ?? null,
    requestId: String(req.id),
    ip: clientAddress(req),
    refetch: req.get('X-Ferrolane-Refetch') === '1',
  }
}

export function signedInActor(req: Request): Actor & { userId: number } {
  return { ...actorOf(req), userId: req.user!.id }
}

/** Route ids are positive integers; anything else is a 400 naming the parameter. */
export function idParam(req: Request, name = 'id'): number {
  const raw = req.params[name]
  const n = Number(raw)
  if (!Number.isSafeInteger(n) || n <= 0)
    throw new Invalid(`${name} must be a positive whole number`, { [name]: 'must be a positive whole number' })
  return n
}
