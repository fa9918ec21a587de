/**
 * maildev's REST API (maildev 3, under /api), so tests read what really arrived over SMTP.
 * Also a small RFC 5545 reader: enough to check the calendar files we send, no dependency.
 */
import { createServer } from 'node:net'

export interface ReceivedAttachment {
  filename: string
  generatedFileName: string
  contentType: string
}
export interface ReceivedMail {
  id: string
  subject: string
  text: string
  html: string
  to: { address: string; name?: string }[]
  from: { address: string; name?: string }[]
  messageId?: string
  headers: Record<string, string>
  attachments?: ReceivedAttachment[]
}

export class Maildev {
  constructor(readonly webPort: number) {}

  static fromEnv(): Maildev {
    const port = Number(process.env.MAILDEV_WEB_PORT)
    if (!port) throw new Error('MAILDEV_WEB_PORT is not set: run the API tests through npm test')
    return new Maildev(port)
  }

  private url(path: string) {
    return `http://127.0.0.1:${this.webPort}/api${path}`
  }

  async list(): Promise<ReceivedMail[]> {
    const res = await fetch(this.url('/email'))
    if (!res.ok) throw new Error(`maildev list: ${res.status}`)
    return (await res.json()) as ReceivedMail[]
  }

  /** Messages to one address, in arrival order. */
  async to(address: string): Promise<ReceivedMail[]> {
    return (await this.list()).filter((m) => m.to.some((t) => t.address.toLowerCase() === address.toLowerCase()))
  }

  async clear(): Promise<void> {
    const res = await fetch(this.url('/email/all'), { method: 'DELETE' })
    if (!res.ok) throw new Error(`maildev clear: ${res.status}`)
  }

  async attachment(mail: ReceivedMail, filenameEnds = '.ics'): Promise<string> {
    const a = mail.attachments?.find((x) => x.filename.endsWith(filenameEnds) || x.generatedFileName.endsWith(filenameEnds))
    if (!a) throw new Error(`no ${filenameEnds} attachment on "${mail.subject}"`)
    const res = await fetch(this.url(`/email/${mail.id}/attachment/${encodeURIComponent(a.generatedFileName)}`))
    if (!res.ok) throw new Error(`maildev attachment: ${res.status}`)
    return res.text()
  }
}

/** A loopback port nobody is listening on right now (for a test's own maildev). */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer()
    s.once('error', reject)
    s.listen(0, '127.0.0.1', () => {
      const { port } = s.address() as { port: number }
      s.close(() => resolve(port))
    })
  })
}

export interface CalendarProperty {
  name: string
  params: Record<string, string>
  value: string
}
export interface Calendar {
  properties: CalendarProperty[]
  events: CalendarProperty[][]
}

/** Unfolds (RFC 5545 §3.1) and splits content lines; keeps VCALENDAR and VEVENT properties. */
export function parseIcs(text: string): Calendar {
  const lines = text
    .replace(/\r\n[ \t]/g, '')
    .replace(/\n[ \t]/g, '')
    .split(/\r?\n/)
    .filter(Boolean)
  const cal: Calendar = { properties: [], events: [] }
  const stack: string[] = []
  let event: CalendarProperty[] | null = null
  for (const line of lines) {
    const colon = findValueColon(line)
    const head = line.slice(0, colon)
    const value = line.slice(colon + 1)
    const [name, ...paramParts] = head.split(';')
    const params: Record<string, string> = {}
    for (const p of paramParts) {
      const [k, v = ''] = p.split('=')
      params[k!.toUpperCase()] = v.replace(/^"|"$/g, '')
    }
    const prop = { name: name!.toUpperCase(), params, value }
    if (prop.name === 'BEGIN') {
      stack.push(value)
      if (value === 'VEVENT') event = []
    } else if (prop.name === 'END') {
      if (stack.pop() !== value) throw new Error(`iCalendar: END:${value} does not close ${stack.at(-1)}`)
      if (value === 'VEVENT' && event) {
        cal.events.push(event)
        event = null
      }
    } else if (stack.at(-1) === 'VEVENT' && event) event.push(prop)
    else if (stack.at(-1) === 'VCALENDAR') cal.properties.push(prop)
  }
  if (stack.length) throw new Error('iCalendar: unclosed component')
  return cal
}

// The value starts after the first colon that is not inside a quoted parameter.
function findValueColon(line: string): number {
  let quoted = false
  for (let i = 0; i < line.length; i++) {
    if (line[i] === '"') quoted = !quoted
    else if (line[i] === ':' && !quoted) return i
  }
  throw new Error(`iCalendar: no value in "${line}"`)
}

export const prop = (props: CalendarProperty[], name: string) => props.find((p) => p.name === name)?.value

/** '20260512T083000Z' → Date. */
export function icsUtc(value: string): Date {
  const m = /^(\d{4})(\d{2})(\d{2})T(\d{2})(\d{2})(\d{2})Z$/.exec(value)
  if (!m) throw new Error(`not a UTC date-time: ${value}`)
  return new Date(Date.UTC(+m[1]!, +m[2]! - 1, +m[3]!, +m[4]!, +m[5]!, +m[6]!))
}
