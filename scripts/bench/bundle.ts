/** Sizes of the built client: what the sign-in page loads (gzip), and every chunk. */
import { readFileSync, readdirSync } from 'node:fs'
import { gzipSync } from 'node:zlib'
import path from 'node:path'
import { signInFetched } from './signInFetch'

interface ManifestChunk {
  file: string
  src?: string
  isEntry?: boolean
  imports?: string[]
  css?: string[]
}
type Manifest = Record<string, ManifestChunk>

async function fetchedKeys(distDir: string) {
  const f = await signInFetched(distDir)
  return {
    signInFetchedJsGzipKB: f.atLoadKB,
    signInFetchedScripts: f.scripts,
    signInAfterSubmitJsGzipKB: f.afterSubmitKB,
    fetchedWithinBudget: f.atLoadKB <= 120,
  }
}

const gz = (file: string) => gzipSync(readFileSync(file)).length

/** The entry plus one lazy view, with every chunk they import statically. */
function closure(manifest: Manifest, keys: string[]): Set<string> {
  const seen = new Set<string>()
  const visit = (k: string) => {
    if (seen.has(k) || !manifest[k]) return
    seen.add(k)
    manifest[k].imports?.forEach(visit)
  }
  keys.forEach(visit)
  return seen
}

export async function bundleReport(distDir: string) {
  const manifest = JSON.parse(readFileSync(path.join(distDir, '.vite', 'manifest.json'), 'utf8')) as Manifest
  const entry = Object.keys(manifest).find((k) => manifest[k].isEntry)!
  const signIn = Object.keys(manifest).find((k) => k.endsWith('SignInView.vue'))
  const keys = closure(manifest, signIn ? [entry, signIn] : [entry])
  const js = [...keys].map((k) => manifest[k].file).filter((f) => f.endsWith('.js'))
  const css = [...new Set([...keys].flatMap((k) => manifest[k].css ?? []))]
  const signInJsGzip = js.reduce((sum, f) => sum + gz(path.join(distDir, f)), 0)
  const allJs = readdirSync(path.join(distDir, 'assets')).filter((f) => f.endsWith('.js'))
  return {
    bench: 'bundle',
    signInJsGzipKB: +(signInJsGzip / 1024).toFixed(1),
    signInCssGzipKB: +(css.reduce((s, f) => s + gz(path.join(distDir, f)), 0) / 1024).toFixed(1),
    signInChunks: js.length,
    budgetKB: 120,
    withinBudget: signInJsGzip / 1024 <= 120,
    totalJsGzipKB: +(allJs.reduce((s, f) => s + gz(path.join(distDir, 'assets', f)), 0) / 1024).toFixed(1),
    chunks: allJs.length,
    // Issue 19 (new keys): what Chromium fetches for the sign-in page once it is idle, and after a
    // first submit. signInJsGzipKB above is the manifest's static count, kept to compare runs.
    ...(await fetchedKeys(distDir)),
  }
}
