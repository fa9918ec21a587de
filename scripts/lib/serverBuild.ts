/**
 * The compiled server (dist-server/) that production and the cluster scripts run with plain
 * node, built only when it is missing or its sources changed since it was built: a stamp beside
 * it holds a digest of every file the build reads.
 */
import { createHash } from 'node:crypto'
import { execFileSync } from 'node:child_process'
import { existsSync, readdirSync, readFileSync, writeFileSync } from 'node:fs'
import path from 'node:path'
import { repoRoot } from './stack'

/** server/ compiles with shared/ and seed/ beside it (server/tsconfig.build.json); the lockfile pins tsc. */
const SOURCE_DIRS = ['server', 'shared', 'seed']
const SOURCE_FILES = ['tsconfig.json', 'package-lock.json', 'scripts/build-server.sh']
const STAMP = '.source-sha256'

function filesUnder(dir: string): string[] {
  const abs = path.join(repoRoot, dir)
  if (!existsSync(abs)) return []
  return readdirSync(abs, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile())
    .map((e) => path.relative(repoRoot, path.join(e.parentPath, e.name)))
}

export function serverSourceDigest(): string {
  const hash = createHash('sha256')
  const files = [...SOURCE_DIRS.flatMap(filesUnder), ...SOURCE_FILES].sort()
  for (const f of files) {
    hash.update(`${f}\0`)
    if (existsSync(path.join(repoRoot, f))) hash.update(readFileSync(path.join(repoRoot, f)))
  }
  return hash.digest('hex')
}

/** Builds dist-server/ unless it is current; returns whether it built. */
export function ensureServerBuild(label: string, outDir = 'dist-server'): boolean {
  const stamp = path.join(repoRoot, outDir, STAMP)
  const want = serverSourceDigest()
  const built = existsSync(path.join(repoRoot, outDir, 'server', 'index.js')) && existsSync(stamp)
  if (built && readFileSync(stamp, 'utf8').trim() === want) return false
  console.log(`[${label}] compiling the server into ${outDir}/ (missing or older than its sources)...`)
  execFileSync('bash', ['scripts/build-server.sh', outDir], { cwd: repoRoot, stdio: ['ignore', 'inherit', 'inherit'] })
  writeFileSync(stamp, `${want}\n`)
  return true
}
