import { describe, expect, it } from 'vitest'
import { spawn, type ChildProcess } from 'node:child_process'
import { connect, createServer, type Socket } from 'node:net'
import { serverCommand } from '../helpers/serverProcess'

// Issue #12, point 6: the real server process (the compiled server under plain node, on the test database)
// stops on SIGTERM without cutting off a request in flight, and exits.

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer()
      .listen(0, '127.0.0.1', () => {
        const p = (s.address() as { port: number }).port
        s.close(() => resolve(p))
      })
      .on('error', reject)
  })
}

interface Running {
  child: ChildProcess
  port: number
  exited: Promise<number | null>
  output: () => string
}

async function startServer(env: Record<string, string> = {}): Promise<Running> {
  const port = await freePort()
  let out = ''
  const server = serverCommand()
  const child = spawn(server.cmd, server.args, {
    cwd: server.cwd,
    env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', STATIC_DIR: '', OUTBOX_POLL_MS: '3600000', LOG_LEVEL: 'info', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  child.stdout!.on('data', (d: Buffer) => {
    out += d.toString()
  })
  child.stderr!.on('data', (d: Buffer) => {
    out += d.toString()
  })
  const exited = new Promise<number | null>((resolve) => child.on('exit', (code) => resolve(code)))
  const deadline = Date.now() + 30_000
  while (!out.includes('Ferrolane listening')) {
    if (Date.now() > deadline || child.exitCode !== null) throw new Error(`the server did not start:\n${out}`)
    await new Promise((r) => setTimeout(r, 100))
  }
  return { child, port, exited, output: () => out }
}

function open(port: number): Promise<Socket> {
  return new Promise((resolve, reject) => {
    const s = connect(port, '127.0.0.1', () => resolve(s))
    s.on('error', reject)
  })
}

/** A sign-in whose body arrives in two parts: the server holds it in flight in between. */
const BODY = '{"email":"nobody@hospital.test","password":"not-a-password"}'
function startSlowRequest(s: Socket): Promise<string> {
  let answer = ''
  const done = new Promise<string>((resolve) => {
    s.on('data', (d: Buffer) => {
      answer += d.toString()
    })
    s.on('close', () => resolve(answer))
  })
  s.write(
    `POST /api/auth/login HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Type: application/json\r\nContent-Length: ` +
      `${BODY.length}\r\nConnection: keep-alive\r\n\r\n${BODY.slice(0, 10)}`,
  )
  return done
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms))

describe('when the server receives SIGTERM', () => {
  it('during a slow request, then it refuses new connections, finishes that request and exits 0', async () => {
    const server = await startServer()
    const s = await open(server.port)
    const answer = startSlowRequest(s)
    await sleep(300)
    server.child.kill('SIGTERM')
    await sleep(500)
    await expect(open(server.port)).rejects.toThrow(/ECONNREFUSED/)
    expect(server.child.exitCode).toBeNull()
    s.write(BODY.slice(10))
    // No CSRF token: the sign-in is refused, but it is answered, in full.
    expect(await answer).toMatch(/^HTTP\/1\.1 403 /)
    expect(await server.exited).toBe(0)
    expect(server.output()).toContain('Ferrolane stopped')
  }, 60_000)

  it('and a request outlasts the grace period, then it is cut off and the process still exits, non-zero', async () => {
    const server = await startServer({ SHUTDOWN_GRACE_SECONDS: '1' })
    const s = await open(server.port)
    const answer = startSlowRequest(s)
    await sleep(300)
    const sentAt = Date.now()
    server.child.kill('SIGTERM')
    expect(await server.exited).toBe(1)
    expect(Date.now() - sentAt).toBeLessThan(10_000)
    expect(await answer).toBe('')
    expect(server.output()).toContain('cut off')
  }, 60_000)
})
