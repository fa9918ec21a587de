/**
 * A local maildev in place of the hospital's mail relay: SMTP and its web UI on loopback.
 * Run as a child process so the app and the tests talk to it over real SMTP and HTTP.
 */
import { spawn, type ChildProcess } from 'node:child_process'
import { readFileSync } from 'node:fs'
import path from 'node:path'

export interface MaildevHandle {
  smtpPort: number
  webPort: number
  stop(): Promise<void>
}

// maildev's package exports hide its package.json from require(), so read it from disk.
function maildevBin(): string {
  const dir = path.resolve(import.meta.dirname, '..', '..', 'node_modules', 'maildev')
  const manifest = JSON.parse(readFileSync(path.join(dir, 'package.json'), 'utf8')) as { bin: string | Record<string, string> }
  const rel = typeof manifest.bin === 'string' ? manifest.bin : manifest.bin.maildev!
  return path.join(dir, rel)
}

async function webAnswers(port: number): Promise<boolean> {
  try {
    const res = await fetch(`http://127.0.0.1:${port}/api/healthz`)
    return res.ok
  } catch {
    return false
  }
}

export async function startMaildev(opts: { smtpPort: number; webPort: number; label: string }): Promise<MaildevHandle> {
  if (await webAnswers(opts.webPort)) {
    console.log(`[${opts.label}] maildev already answering on port ${opts.webPort}`)
    return { ...opts, stop: async () => {} }
  }
  const child: ChildProcess = spawn(
    process.execPath,
    [maildevBin(), '--smtp', String(opts.smtpPort), '--web', String(opts.webPort), '--ip', '127.0.0.1', '--web-ip', '127.0.0.1'],
    { stdio: ['ignore', 'ignore', 'inherit'] },
  )
  let exited = false
  child.on('exit', () => {
    exited = true
  })
  const deadline = Date.now() + 20_000
  while (!(await webAnswers(opts.webPort))) {
    if (exited) throw new Error(`maildev exited at start (ports ${opts.smtpPort}/${opts.webPort} in use?)`)
    if (Date.now() > deadline) throw new Error('Timed out waiting for maildev')
    await new Promise((r) => setTimeout(r, 200))
  }
  console.log(`[${opts.label}] maildev SMTP 127.0.0.1:${opts.smtpPort}, web http://127.0.0.1:${opts.webPort}`)
  return {
    ...opts,
    stop: async () => {
      if (exited) return
      child.kill('SIGTERM')
      await new Promise((r) => child.once('exit', r))
    },
  }
}
