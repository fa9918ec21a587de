/**
 * npm test: its own MariaDB (.test-data/, port 3407) and maildev (1026/1081), so it never
 * touches the demo data and can run beside `npm start`. Runs lint (ESLint and Prettier), the
 * type-checks, unit tests, a client build, API tests and browser tests, then prints one line:
 * "N passed, N failed". `npm test -- unit api` runs only the named steps.
 */
import { spawn } from 'node:child_process'
import { existsSync, readFileSync, rmSync } from 'node:fs'
import path from 'node:path'
import { startStack, repoRoot, intFromEnv } from './lib/stack'
import { prepareDatabase } from './lib/prepare'
import { demoClinicEnv } from '../seed/demo/hospital'

interface Tally {
  passed: number
  failed: number
}
interface Step {
  name: string
  run: () => Promise<Tally>
}

// FERROLANE_TEST_DATA_DIR with the TEST_* ports lets two test runs share a machine.
const dataDir = path.resolve(repoRoot, process.env.FERROLANE_TEST_DATA_DIR || '.test-data')
const bin = (name: string) => path.join(repoRoot, 'node_modules/.bin', name)

function exec(cmd: string, args: string[], env: NodeJS.ProcessEnv): Promise<number> {
  return new Promise((resolve) => {
    const child = spawn(cmd, args, { cwd: repoRoot, env, stdio: 'inherit' })
    child.on('exit', (code) => resolve(code ?? 1))
  })
}

/** A command that is one check: it passes or fails as a whole. */
function checkStep(name: string, cmd: string, args: string[], env: NodeJS.ProcessEnv): Step {
  return { name, run: async () => ((await exec(cmd, args, env)) === 0 ? { passed: 1, failed: 0 } : { passed: 0, failed: 1 }) }
}

/** A Vitest project, counted test by test from its JSON report. */
function vitestStep(name: string, project: string, env: NodeJS.ProcessEnv): Step {
  return {
    name,
    run: async () => {
      const report = path.join(dataDir, `vitest-${project}.json`)
      rmSync(report, { force: true })
      // TEST_FILES narrows a run to some files while working (e.g. TEST_FILES=worklist npm test -- api).
      const files = (process.env.TEST_FILES ?? '').split(',').filter(Boolean)
      const code = await exec(
        bin('vitest'),
        ['run', '--project', project, '--reporter=default', '--reporter=json', `--outputFile.json=${report}`, ...files],
        env,
      )
      if (!existsSync(report)) return { passed: 0, failed: 1 }
      const r = JSON.parse(readFileSync(report, 'utf8')) as {
        numPassedTests: number
        numFailedTests: number
        numTotalTests: number
        testResults: { status: string }[]
      }
      // A file that fails to load has no tests in the count; it still fails the run.
      const brokenFiles = r.testResults.filter((f) => f.status === 'failed').length
      const failed = r.numFailedTests || (code !== 0 ? Math.max(1, brokenFiles) : 0)
      return { passed: r.numPassedTests, failed }
    },
  }
}

async function main(): Promise<void> {
  const only = process.argv.slice(2)
  const tally: Tally = { passed: 0, failed: 0 }
  const runStep = async (step: Step) => {
    console.log(`\n=== ${step.name} ===`)
    const t = await step.run()
    console.log(`=== ${step.name}: ${t.passed} passed, ${t.failed} failed ===`)
    tally.passed += t.passed
    tally.failed += t.failed
  }
  // Lint first, and before the database starts: it reads only the source files.
  if (!only.length || only.includes('lint')) await runStep(checkStep('lint', 'npm', ['run', '--silent', 'lint'], process.env))
  if (only.length && only.every((name) => name === 'lint')) return finish(tally)
  const stack = await startStack({
    label: 'test',
    dataDir,
    dbPort: intFromEnv('TEST_DB_PORT', 3407),
    dbName: 'ferrolane_test',
    dbUser: 'ferrolane_test',
    dbPassword: 'ferrolane-test-only',
    smtpPort: intFromEnv('TEST_SMTP_PORT', 1026),
    mailWebPort: intFromEnv('TEST_MAILDEV_WEB_PORT', 1081),
    freshDatabase: true,
    // A throw-away database: commits flushed about once a second, for speed.
    durability: 'relaxed',
  })
  const distDir = path.join(dataDir, 'dist')
  // The server as production runs it (npm run build:server); API tests that start a process use it.
  const serverDir = path.join(dataDir, 'dist-server')
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    ...stack.env,
    // The tests read the demo hospital's details in e-mails, letters and the reply page.
    ...demoClinicEnv(process.env),
    NODE_ENV: 'test',
    STATIC_DIR: distDir,
    FERROLANE_SERVER_ENTRY: path.join(serverDir, 'server', 'index.js'),
    SESSION_SECRET: 'ferrolane-test-secret-not-for-production',
    // The suite signs admins in with a password everywhere; the second-factor tests turn this back on.
    ADMIN_SECOND_FACTOR_REQUIRED: 'false',
  }
  try {
    await prepareDatabase(env, { seedDemo: false })
    const steps: Step[] = [
      checkStep('typecheck-client', bin('vue-tsc'), ['--noEmit', '-p', 'tsconfig.json'], env),
      checkStep('typecheck-server', bin('tsc'), ['--noEmit', '-p', 'server/tsconfig.json'], env),
      vitestStep('unit', 'unit', env),
      // Built as npm start builds it: Vue's production template compiler refuses some code the test mode lets through.
      checkStep('build-server', 'bash', ['scripts/build-server.sh', serverDir], env),
      checkStep('build', bin('vite'), ['build', '--outDir', distDir, '--emptyOutDir', '--logLevel', 'warn'], {
        ...env,
        NODE_ENV: 'production',
      }),
      vitestStep('api', 'api', env),
      vitestStep('e2e', 'e2e', env),
    ]
    for (const step of steps) {
      // The browser tests need the client build; the API tests start the compiled server.
      const needed =
        (step.name === 'build' && only.includes('e2e')) ||
        (step.name === 'build-server' && (only.includes('api') || only.includes('build')))
      if (only.length && !only.includes(step.name) && !needed) continue
      await runStep(step)
    }
  } catch (err) {
    console.error('[test] could not run:', err)
    tally.failed += 1
  } finally {
    await stack.stop().catch((err) => console.error('[test] stopping services:', err))
  }
  finish(tally)
}

function finish(tally: Tally): never {
  console.log(`\n${tally.passed} passed, ${tally.failed} failed`)
  process.exit(tally.failed === 0 && tally.passed > 0 ? 0 : 1)
}

void main()
