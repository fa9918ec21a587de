import type { Hl7Message } from '@medplum/core'
import { SUPPORTED_VERSIONS } from '../../../shared/hl7'
import { Hl7Problem } from './ack'

/** Message types Ferrolane takes (MSH-9 type^event). */
const HANDLED = ['ORU^R01', 'SIU^S12', 'SIU^S13', 'SIU^S14', 'SIU^S15', 'ADT^A08'] as const

export interface Header {
  controlId: string
  sendingApp: string
  sendingFacility: string
  type: string
  version: string
}

const cut = (s: string, n: number) => s.trim().slice(0, n)

export function readHeader(msg: Hl7Message): Header {
  const msh = msg.header
  return {
    controlId: cut(msh.getComponent(10, 1), 100),
    sendingApp: cut(msh.getComponent(3, 1), 100),
    sendingFacility: cut(msh.getComponent(4, 1), 100),
    type: cut(`${msh.getComponent(9, 1)}^${msh.getComponent(9, 2)}`, 20),
    version: cut(msh.getComponent(12, 1), 10),
  }
}

export function checkHeader(h: Header): void {
  if (!h.controlId)
    throw new Hl7Problem('AR', 'missing-control-id', 'MSH-10 message control id is empty', '101', { segment: 'MSH', field: 10 })
  if (!(SUPPORTED_VERSIONS as readonly string[]).includes(h.version)) {
    throw new Hl7Problem(
      'AR',
      'unsupported-version',
      `HL7 version "${h.version}" is not supported (${SUPPORTED_VERSIONS.join(', ')})`,
      '203',
      { segment: 'MSH', field: 12 },
    )
  }
  if (!(HANDLED as readonly string[]).includes(h.type)) {
    throw new Hl7Problem('AR', 'unsupported-type', `message type ${h.type} is not one Ferrolane takes (${HANDLED.join(', ')})`, '200', {
      segment: 'MSH',
      field: 9,
    })
  }
}

export function mrnOf(msg: Hl7Message): string | null {
  return cut(msg.getSegment('PID')?.getComponent(3, 1) ?? '', 40) || null
}

/** A message as the inbox holds it while its batch is stored. */
export interface Incoming {
  msg: Hl7Message
  h: Header
  raw: string
  receivedAt: Date
}
