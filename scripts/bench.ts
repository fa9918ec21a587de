/**
 * npm run bench: builds the client into .bench-data/ and prints one JSON line per figure.
 * Its own MariaDB (.bench-data/, port 3410) holds the bench database, loaded once and kept.
 * `npm run bench -- bundle`, `-- worklist`, `-- reports`, `-- imports`, `-- hl7` or `-- polls` runs one part.
 * BENCH_DATA_DIR (default .bench-data) and BENCH_DB_PORT let two benches run side by side.
 */
import { spawnSync } from 'node:child_process'
import { readFileSync } from 'node:fs'
import path from 'node:path'
import { repoRoot, startStack, intFromEnv } from './lib/stack'
import { prepareDatabase } from './lib/prepare'
import { bundleReport } from './bench/bundle'
import { loadBenchData } from './bench/benchData'
import { benchWorklist } from './bench/worklist'
import { benchReports } from './bench/reports'
import { benchImports } from './bench/imports'
import { benchHl7 } from './bench/hl7'
import { benchPolls } from './bench/polls'
import { benchSummary } from './bench/summary'

const benchDir = path.resolve(repoRoot, process.env.BENCH_DATA_DIR || '.bench-data')
const only = process.argv.slice(2)
const wants = (part: string) => only.length === 0 || only.includes(part)

function buildClient(outDir: string): void {
  const r = spawnSync(
    path.join(repoRoot, 'node_modules/.bin/vite'),
    ['build', '--outDir', outDir, '--emptyOutDir', '--logLevel', 'error'],
    { cwd: repoRoot, stdio: 'inherit' },
  )
  if (r.status !== 0) throw new Error('client build failed')
}

async function main(): Promise<void> {
  const dist = path.join(benchDir, 'dist')
  // The browser bench serves the built client, so it builds it too when run on its own.
  if (wants('bundle') || (wants('polls') && !process.env.BENCH_POLL_DIST)) buildClient(dist)
  const parts: Parameters<typeof benchSummary>[0] = {}
  // Each part's line is printed as it finishes; the summary closes the run.
  const print = <T>(part: keyof typeof parts, result: T): T => {
    ;(parts as Record<string, unknown>)[part] = result
    console.log(JSON.stringify(result))
    return result
  }
  if (wants('bundle')) print('bundle', await bundleReport(dist))
  if (!['worklist', 'reports', 'imports', 'hl7', 'polls'].some(wants)) {
    console.log(JSON.stringify(benchSummary(parts)))
    return
  }
  const stack = await startStack({
    label: 'bench',
    dataDir: benchDir,
    dbPort: intFromEnv('BENCH_DB_PORT', 3410),
    dbName: 'ferrolane_bench',
    dbUser: 'ferrolane_bench',
    dbPassword: 'ferrolane-bench-only',
    durability: 'relaxed', // a throw-away database, as in the tests
  })
  try {
    const env: NodeJS.ProcessEnv = {
      ...process.env,
      ...stack.env,
      SESSION_SECRET: 'ferrolane-bench-secret-not-for-production',
      SMTP_PORT: '1',
      ADMIN_SECOND_FACTOR_REQUIRED: 'false',
    }
    if (process.env.BENCH_SERVER !== 'tsx') {
      const out = path.join(benchDir, 'dist-server')
      if (spawnSync('bash', ['scripts/build-server.sh', out], { cwd: repoRoot, stdio: 'inherit' }).status !== 0)
        throw new Error('server build failed')
      env.BENCH_SERVER_ENTRY = path.join(out, 'server', 'index.js')
    }
    await prepareDatabase(env, { seedDemo: false })
    const t0 = Date.now()
    const data = await loadBenchData({
      host: '127.0.0.1',
      port: stack.mariadb.port,
      user: env.DB_USER!,
      password: env.DB_PASSWORD!,
      database: env.DB_NAME!,
    })
    if (data.loaded) console.error(`[bench] loaded the bench database in ${((Date.now() - t0) / 1000).toFixed(1)} s`)
    const databasePid = Number(readFileSync(path.join(benchDir, 'mariadb.pid'), 'utf8').trim())
    if (wants('worklist')) print('worklist', await benchWorklist(env, data.nurseEmail, databasePid))
    if (wants('reports')) print('reports', await benchReports(env, databasePid))
    if (wants('imports')) print('imports', await benchImports(env, data.nurseEmail, benchDir, databasePid))
    if (wants('hl7')) print('hl7', await benchHl7(env))
    if (wants('polls')) print('polls', await benchPolls(env, dist))
    console.log(JSON.stringify(benchSummary(parts)))
  } finally {
    await stack.stop()
  }
}

main().catch((err) => {
  console.error(err)
  process.exit(1)
})
