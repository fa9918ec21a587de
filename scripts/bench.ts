/**
 * npm run bench: builds the client into .bench-data/ and prints one JSON line per figure.
 * Later benchmarks (worklist, imports, reports) add their own steps here.
 */
import { spawnSync } from 'node:child_process'
import path from 'node:path'
import { repoRoot } from './lib/stack'
import { bundleReport } from './bench/bundle'

const benchDir = path.resolve(repoRoot, '.bench-data')

function buildClient(outDir: string): void {
  const r = spawnSync(path.join(repoRoot, 'node_modules/.bin/vite'), ['build', '--outDir', outDir, '--emptyOutDir', '--logLevel', 'error'], { cwd: repoRoot, stdio: 'inherit' })
  if (r.status !== 0) throw new Error('client build failed')
}

async function main(): Promise<void> {
  const dist = path.join(benchDir, 'dist')
  buildClient(dist)
  console.log(JSON.stringify(bundleReport(dist)))
}

main().catch((err) => {
  console.error(err)
  process.exit(1)
})
