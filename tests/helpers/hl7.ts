import net from 'node:net'
import { Hl7Message } from '@medplum/core'
import { sendMessages, unescapeHl7 } from '../../scripts/lib/hl7Client'

export const VT = String.fromCharCode(0x0b)
export const END = String.fromCharCode(0x1c, 0x0d)

let seq = 0
/** A control id no other test message in this run has. */
export const controlId = () => `T${process.pid}-${Date.now()}-${++seq}`

/** An HL7 v2 timestamp of an instant, in UTC with its offset. */
export function hl7Ts(at: Date): string {
  return at.toISOString().replace(/[-:T]/g, '').slice(0, 14) + '+0000'
}

export interface ObxSpec {
  code?: string
  system?: string
  type?: string
  value: string
  unit?: string
  status?: string
  at?: Date
  range?: string
  flag?: string
}

/** An ORU^R01 for one patient (invented data), one OBX per spec. */
export function oru(o: {
  mrn: string
  authority?: string
  control?: string
  version?: string
  facility?: string
  obx: ObxSpec[]
  at?: Date
}): string {
  const at = o.at ?? new Date(Date.now() - 3600_000)
  const ctl = o.control ?? controlId()
  const lines = [
    `MSH|^~\\&|KVLAB|${o.facility ?? 'KVH-PATH'}|FERROLANE|KVH|${hl7Ts(new Date())}||ORU^R01^ORU_R01|${ctl}|P|${o.version ?? '2.5.1'}`,
    `PID|1||${o.mrn}^^^${o.authority ?? 'KVH'}^MR||Testpatient^Invented||19600101|F`,
    `OBR|1|PL${ctl}|FL${ctl}|FBC^Full blood count^L|||${hl7Ts(at)}`,
    ...o.obx.map(
      (x, i) =>
        `OBX|${i + 1}|${x.type ?? 'NM'}|${x.code ?? '718-7'}^Test^${x.system ?? 'LN'}||${x.value}|${x.unit ?? 'g/L'}^^UCUM|` +
        `${x.range ?? ''}|${x.flag ?? ''}|||${x.status ?? 'F'}|||${x.at ? hl7Ts(x.at) : ''}`,
    ),
  ]
  return lines.join('\r')
}

export async function send(port: number, ...messages: string[]): Promise<Hl7Message[]> {
  return sendMessages('127.0.0.1', port, messages)
}

export const ackCode = (ack: Hl7Message) => ack.getSegment('MSA')!.getComponent(1, 1)
/** ERR-8, the reason for people, with HL7's escape sequences read back. */
export const ackError = (ack: Hl7Message) => unescapeHl7(ack.getSegment('ERR')?.getComponent(8, 1) ?? '')

/**
 * Raw bytes over TCP (for broken frames and dropped connections): collects what the listener
 * sends back until it closes the connection or `waitMs` passes.
 */
export function rawExchange(
  port: number,
  chunks: (string | Buffer)[],
  o: { waitMs?: number; end?: boolean } = {},
): Promise<{ received: string; closedByServer: boolean }> {
  return new Promise((resolve, reject) => {
    const socket = net.connect(port, '127.0.0.1')
    let received = ''
    let closedByServer = false
    let done = false
    const finish = () => {
      if (!done) {
        done = true
        socket.destroy()
        resolve({ received, closedByServer })
      }
    }
    socket.on('data', (d) => {
      received += d.toString('utf8')
    })
    socket.on('end', () => {
      closedByServer = true
      finish()
    })
    socket.on('close', () => {
      closedByServer = true
      finish()
    })
    socket.on('error', (err: NodeJS.ErrnoException) =>
      err.code === 'ECONNRESET' || err.code === 'EPIPE' ? ((closedByServer = true), finish()) : reject(err),
    )
    socket.on('connect', () => {
      for (const c of chunks) socket.write(c)
      if (o.end) socket.end()
      setTimeout(finish, o.waitMs ?? 1000)
    })
  })
}
