import { randomUUID } from 'node:crypto'
import type { RequestHandler } from 'express'

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      id: string
    }
  }
}

/** Every response carries the id that the server's log uses for the same request. */
export const requestId: RequestHandler = (req, res, next) => {
  req.id = randomUUID()
  res.setHeader('X-Request-Id', req.id)
  next()
}
