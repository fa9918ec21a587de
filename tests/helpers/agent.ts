import request from 'supertest'
import type { Express } from 'express'
import { expect } from 'vitest'

export type Agent = ReturnType<typeof request.agent>

/** A cookie-keeping client that sends the CSRF token the way the browser app does. */
export class Client {
  readonly agent: Agent
  csrf = ''

  // An Express app (in process) or a base URL (a server process the test started).
  constructor(app: Express | string) {
    this.agent = request.agent(app)
  }

  async fetchCsrf(): Promise<string> {
    const res = await this.agent.get('/api/auth/csrf').expect(200)
    this.csrf = res.body.csrfToken
    return this.csrf
  }

  async signIn(email: string, password: string) {
    if (!this.csrf) await this.fetchCsrf()
    const res = await this.agent.post('/api/auth/login').set('X-CSRF-Token', this.csrf).send({ email, password })
    if (res.status === 200) this.csrf = res.body.csrfToken
    return res
  }

  async mustSignIn(email: string, password: string): Promise<this> {
    const res = await this.signIn(email, password)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    return this
  }

  get(path: string) {
    return this.agent.get(path)
  }
  post(path: string, body?: object) {
    return this.agent
      .post(path)
      .set('X-CSRF-Token', this.csrf)
      .send(body ?? {})
  }
  patch(path: string, body?: object) {
    return this.agent
      .patch(path)
      .set('X-CSRF-Token', this.csrf)
      .send(body ?? {})
  }
  put(path: string, body?: object) {
    return this.agent
      .put(path)
      .set('X-CSRF-Token', this.csrf)
      .send(body ?? {})
  }
  delete(path: string) {
    return this.agent.delete(path).set('X-CSRF-Token', this.csrf)
  }
}
