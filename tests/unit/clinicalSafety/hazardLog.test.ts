import { existsSync, readFileSync, readdirSync } from 'node:fs'
import path from 'node:path'
import { describe, expect, it } from 'vitest'

/**
 * The hazard log is only worth something while every control's test still exists. This reads
 * each docs/clinical-safety/hazard-log*.md, checks every hazard has all its fields, and that each
 * named test file exists and still contains an it(...) or test(...) with exactly that title.
 */
const ROOT = path.resolve(__dirname, '../../..')
const DIR = path.join(ROOT, 'docs/clinical-safety')
const FIELDS = ['Hazard', 'Cause', 'Effect', 'Severity', 'Likelihood', 'Control', 'Test'] as const

interface Hazard {
  id: string
  title: string
  fields: Record<string, string[]>
  file: string
}

export function parseHazards(text: string, file: string): Hazard[] {
  const out: Hazard[] = []
  let current: Hazard | null = null
  for (const line of text.split('\n')) {
    const head = /^### (H-\d{3}) (.+)$/.exec(line)
    if (head) {
      current = { id: head[1]!, title: head[2]!.trim(), fields: {}, file }
      out.push(current)
      continue
    }
    if (/^#{1,3} /.test(line)) current = null
    const field = /^- \*\*(\w+):\*\* (.+)$/.exec(line)
    if (current && field) (current.fields[field[1]!] ??= []).push(field[2]!.trim())
  }
  return out
}

/** "`tests/unit/x.test.ts` › "title"" → file and title. */
export function parseTestRef(ref: string): { file: string; title: string } | null {
  const m = /^`([^`]+\.test\.ts)` › "(.+)"$/.exec(ref)
  return m ? { file: m[1]!, title: m[2]! } : null
}

/** A title may be split into 'part ' + 'part' to keep lines at most 140 characters; the parts are joined. */
function testTitles(source: string): Set<string> {
  const titles = new Set<string>()
  const start = /\b(?:it|test)\(/g
  const part = /\s*(['"`])((?:\\.|(?!\1).)*)\1\s*(\+)?/y
  for (const m of source.matchAll(start)) {
    let title = ''
    let found = false
    part.lastIndex = m.index! + m[0].length
    for (let p = part.exec(source); p; p = p[3] ? part.exec(source) : null) {
      title += p[2]!.replace(/\\(['"`\\])/g, '$1')
      found = true
    }
    if (found) titles.add(title)
  }
  return titles
}

const logs = existsSync(DIR) ? readdirSync(DIR).filter((f) => /^hazard-log.*\.md$/.test(f)) : []
const hazards = logs.flatMap((f) => parseHazards(readFileSync(path.join(DIR, f), 'utf8'), f))

describe('the clinical hazard log', () => {
  it('when the hazard logs are read, then there is at least one hazard and every id is unique', () => {
    expect(logs).toContain('hazard-log.md')
    expect(hazards.length).toBeGreaterThan(0)
    const ids = hazards.map((h) => h.id)
    expect(ids.filter((id, i) => ids.indexOf(id) !== i)).toEqual([])
  })

  it('when a hazard is listed, then it has every field: hazard, cause, effect, severity, likelihood, control and test', () => {
    const gaps = hazards.flatMap((h) => FIELDS.filter((f) => !h.fields[f]?.length).map((f) => `${h.file} ${h.id}: no ${f}`))
    expect(gaps).toEqual([])
  })

  it('when a hazard names a test, then the file exists and contains a test with exactly that title', () => {
    const broken: string[] = []
    for (const h of hazards) {
      for (const ref of h.fields.Test ?? []) {
        const t = parseTestRef(ref)
        if (!t) {
          broken.push(`${h.file} ${h.id}: cannot read test reference ${ref}`)
          continue
        }
        const file = path.join(ROOT, t.file)
        if (!existsSync(file)) {
          broken.push(`${h.file} ${h.id}: no file ${t.file}`)
          continue
        }
        if (!testTitles(readFileSync(file, 'utf8')).has(t.title)) broken.push(`${h.file} ${h.id}: no test "${t.title}" in ${t.file}`)
      }
    }
    expect(broken).toEqual([])
  })

  it('when a test reference names a missing test, then the check reports it (the check can fail)', () => {
    const text = '### H-999 Example\n- **Hazard:** x\n- **Test:** `tests/unit/clinicalSafety/hazardLog.test.ts` › "no such test title"\n'
    const [h] = parseHazards(text, 'example.md')
    const t = parseTestRef(h!.fields.Test![0]!)!
    expect(testTitles(readFileSync(path.join(ROOT, t.file), 'utf8')).has(t.title)).toBe(false)
    expect(FIELDS.filter((f) => !h!.fields[f]?.length)).toEqual(['Cause', 'Effect', 'Severity', 'Likelihood', 'Control'])
  })
})
