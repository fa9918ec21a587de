/** A real Ferrolane server process on the bench database, and a signed-in cookie for it. */
import { spawn, type ChildProcess } from 'node:child_process'
import { readFileSync, writeFileSync } from 'node:fs'
import { repoRoot } from '../lib/stack'

export interface BenchServer {
  url: string
  pid: number
  stop(): Promise<void>
}

/** `staticDir`: a built client to serve as well (the browser benches); none by default. */
export async function startBenchServer(env: NodeJS.ProcessEnv, fixedPort: number, staticDir = ''): Promise<BenchServer> {
  // BENCH_PORT_OFFSET moves the fixed ports, so two benches on one machine do not collide.
  const port = fixedPort + Number(env.BENCH_PORT_OFFSET || 0)
  const url = `http://127.0.0.1:${port}`
  // The compiled server as production runs it (BENCH_SERVER_ENTRY, set by bench.ts), or with
  // BENCH_SERVER=tsx the TypeScript under `node --import tsx` (not the tsx CLI, so the pid
  // measured is the server itself), to compare the two.
  // BENCH_CPU_PROF=<dir> writes a V8 CPU profile of the server to look for where time goes.
  const entry = env.BENCH_SERVER_ENTRY ? [env.BENCH_SERVER_ENTRY] : ['--import', 'tsx', 'server/index.ts']
  // Started through the launcher that sets node's flags, as production is; it execs node, so the pid
  // measured is the server's.
  const child: ChildProcess = spawn(
    'sh',
    [
      'scripts/node-server.sh',
      ...(process.env.BENCH_CPU_PROF ? ['--cpu-prof', '--cpu-prof-dir=' + process.env.BENCH_CPU_PROF] : []),
      ...entry,
    ],
    {
      cwd: repoRoot,
      env: { ...env, PORT: String(port), NODE_ENV: 'production', FERROLANE_DEMO: 'true', STATIC_DIR: staticDir, NODE: process.execPath },
      stdio: ['ignore', 'ignore', 'inherit'],
    },
  )
  for (let i = 0; ; i++) {
    try {
      if ((await fetch(`${url}/api/health`)).ok) break
    } catch {
      /* starting */
    }
    // A busy shared machine can take a minute; a server that never answers is not left running.
    if (i > 240) {
      child.kill('SIGTERM')
      throw new Error('bench server did not start')
    }
    await new Promise((r) => setTimeout(r, 250))
  }
  return {
    url,
    pid: child.pid!,
    stop: async () => {
      child.kill('SIGTERM')
      await new Promise((r) => child.once('exit', r))
    },
  }
}

export async function signIn(url: string, email: string, password: string): Promise<string> {
  const csrfRes = await fetch(`${url}/api/auth/csrf`)
  const cookie = (csrfRes.headers.get('set-cookie') ?? '').split(';')[0]!
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string }
  const login = await fetch(`${url}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', 'x-csrf-token': csrfToken, cookie },
    body: JSON.stringify({ email, password }),
  })
  if (!login.ok) throw new Error(`bench sign-in failed: ${login.status}`)
  return (login.headers.get('set-cookie') ?? '').split(';')[0]!
}

export function memoryMb(pid: number): { rssMb: number; peakMb: number } {
  const status = readFileSync(`/proc/${pid}/status`, 'utf8')
  const kb = (key: string) => Number(new RegExp(`${key}:\\s+(\\d+)`).exec(status)?.[1] ?? 0)
  return { rssMb: Math.round(kb('VmRSS') / 1024), peakMb: Math.round(kb('VmHWM') / 1024) }
}

/**
 * Starts the kernel's peak (VmHWM) again from the present resident size, so a later memoryMb()
 * reports the peak of what ran since; false where the kernel does not allow it.
 */
export function resetPeakMemory(pid: number): boolean {
  try {
    writeFileSync(`/proc/${pid}/clear_refs`, '5')
    return true
  } catch {
    return false
  }
}

/** CPU time (user + system) a process has used so far, in ms; Linux clock ticks are 10 ms. */
export function cpuMs(pid: number): number {
  const stat = readFileSync(`/proc/${pid}/stat`, 'utf8')
  // Fields after the command name, which is in parentheses and may hold spaces.
  const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ')
  return (Number(f[11]) + Number(f[12])) * 10
}
