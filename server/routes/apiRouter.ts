import { Router, type RequestHandler } from 'express'
import { authorize, type AccessOptions } from '../middleware/authorize'
import type { Action } from '../../shared/permissions'

export interface RouteSpec {
  method: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE'
  path: string
  action: Action
}

/**
 * An Express router that will not mount a handler without naming its action in the permission
 * table (shared/permissions.ts), and remembers each route so the role-matrix test can prove that
 * every mounted route is in its table.
 */
export class ApiRouter {
  readonly router = Router()
  readonly specs: RouteSpec[] = []

  constructor(readonly prefix: string) {}

  private add(method: RouteSpec['method'], path: string, opts: AccessOptions, handlers: RequestHandler[]): this {
    this.specs.push({ method, path: this.prefix + path, action: opts.action })
    const verb = method.toLowerCase() as 'get' | 'post' | 'patch' | 'put' | 'delete'
    // The pattern, not the URL, names the route in the log and the metrics (bounded, no patient data).
    const pattern = `${method} ${this.prefix + path}`
    const stamp: RequestHandler = (_req, res, next) => {
      res.locals.routePattern = pattern
      next()
    }
    this.router[verb](path, stamp, authorize(opts), ...handlers)
    return this
  }

  get(path: string, opts: AccessOptions, ...h: RequestHandler[]) {
    return this.add('GET', path, opts, h)
  }
  post(path: string, opts: AccessOptions, ...h: RequestHandler[]) {
    return this.add('POST', path, opts, h)
  }
  patch(path: string, opts: AccessOptions, ...h: RequestHandler[]) {
    return this.add('PATCH', path, opts, h)
  }
  put(path: string, opts: AccessOptions, ...h: RequestHandler[]) {
    return this.add('PUT', path, opts, h)
  }
  delete(path: string, opts: AccessOptions, ...h: RequestHandler[]) {
    return this.add('DELETE', path, opts, h)
  }
}
