/** One sample of Prometheus' text exposition format: `name{label="v",...} value`. */
export interface Sample {
  name: string
  labels: Record<string, string>
  value: number
}

/**
 * Reads a scrape the way a Prometheus server would need it to be: every line is a comment
 * (# HELP / # TYPE), blank, or a sample whose value is a number. Anything else throws.
 */
export function parsePrometheus(text: string): { types: Map<string, string>; samples: Sample[] } {
  const types = new Map<string, string>()
  const samples: Sample[] = []
  for (const line of text.split('\n')) {
    if (!line.trim()) continue
    const type = /^# TYPE (\S+) (counter|gauge|histogram|summary|untyped)$/.exec(line)
    if (type) {
      types.set(type[1], type[2])
      continue
    }
    if (line.startsWith('# HELP ')) continue
    const m = /^([a-zA-Z_:][a-zA-Z0-9_:]*)(?:\{(.*)\})? (\S+)$/.exec(line)
    if (!m) throw new Error(`not a Prometheus sample line: ${line}`)
    const labels: Record<string, string> = {}
    for (const l of (m[2] ?? '').matchAll(/([a-zA-Z_][a-zA-Z0-9_]*)="((?:[^"\\]|\\.)*)"/g)) labels[l[1]] = l[2]
    const value = m[3] === '+Inf' ? Infinity : m[3] === '-Inf' ? -Infinity : Number(m[3])
    if (Number.isNaN(value) && m[3] !== 'NaN') throw new Error(`not a number: ${line}`)
    samples.push({ name: m[1], labels, value })
  }
  return { types, samples }
}
