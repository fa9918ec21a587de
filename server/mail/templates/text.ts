import type { MessageContent } from './content'

/** The plain-text part: readable on its own, in any mail program or a screen reader. */
export function renderText(c: MessageContent): string {
  const out: string[] = [c.heading.toUpperCase(), '', c.greeting, '', ...c.intro, '']
  const width = Math.max(...c.details.map((d) => d.label.length))
  for (const d of c.details) out.push(`${(d.label + ':').padEnd(width + 2)}${d.value}`)
  if (c.preparation) out.push('', 'Before you come', ...c.preparation.map((p) => `  - ${p}`))
  if (c.reply) out.push('', c.reply.prompt, `Confirm or ask to rebook: ${c.reply.url}`)
  out.push('', ...c.closing, '', '--', `${c.clinic.service}`, c.clinic.name, `Telephone ${c.clinic.phone}`, c.clinic.email)
  return out.join('\n') + '\n'
}
