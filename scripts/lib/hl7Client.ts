import { Hl7Message } from '@medplum/core'
import { Hl7Client } from '@medplum/hl7'

/** The messages of an .hl7 file: blank lines separate messages; segments end with CR, LF or CRLF. */
export function messagesFromText(text: string): string[] {
  const out: string[] = []
  let current: string[] = []
  for (const line of text.split(/\r\n|\r|\n/)) {
    if (line.startsWith('MSH') && current.length) {
      out.push(current.join('\r'))
      current = []
    }
    if (line.trim()) current.push(line)
  }
  if (current.length) out.push(current.join('\r'))
  return out
}

/** Sends messages one after another over one MLLP connection, each answered before the next. */
export async function sendMessages(host: string, port: number, messages: string[], timeoutMs = 15_000): Promise<Hl7Message[]> {
  const client = new Hl7Client({ host, port, connectTimeout: 5000 })
  try {
    const acks: Hl7Message[] = []
    for (const text of messages) acks.push(await client.sendAndWait(Hl7Message.parse(text), { timeoutMs }))
    return acks
  } finally {
    await client.close()
  }
}

const UNESCAPE: Record<string, string> = { F: '|', S: '^', T: '&', R: '~', E: '\\' }
/** Text of a field with HL7's escape sequences (\\F\\, \\S\\ …) read back. */
export const unescapeHl7 = (s: string) => s.replace(/\\([FSTRE])\\/g, (_m, c: string) => UNESCAPE[c]!)

/** "AA CTRL1 text" and ERR-8, one line per ACK, for people reading a terminal. */
export function describeAck(ack: Hl7Message): string {
  const msa = ack.getSegment('MSA')
  const err = ack.getSegment('ERR')
  const why = err ? err.getComponent(8, 1) || err.getComponent(1, 4, 2) : ''
  return `${msa?.getComponent(1, 1) ?? '??'} ${msa?.getComponent(2, 1) ?? ''}${why ? ` — ${unescapeHl7(why)}` : ''}`
}
