/**
 * npm run hl7:send -- FILE...   A stand-in laboratory / theatre system for the demo and tests:
 * sends each .hl7 file's messages over MLLP to Ferrolane's listener and prints every ACK.
 * Address from HL7_MLLP_HOST / HL7_MLLP_PORT (the server's own settings).
 */
import { readFileSync } from 'node:fs'
import { loadConfig } from '../server/config'
import { describeAck, messagesFromText, sendMessages } from './lib/hl7Client'

async function main(): Promise<void> {
  const files = process.argv.slice(2).filter((a) => a !== '--')
  if (!files.length) {
    console.error('usage: npm run hl7:send -- FILE.hl7 [FILE.hl7 ...]')
    process.exit(2)
  }
  const { host, port } = loadConfig().hl7
  let failed = 0
  for (const file of files) {
    const messages = messagesFromText(readFileSync(file, 'utf8'))
    const acks = await sendMessages(host, port, messages)
    for (const ack of acks) {
      const line = describeAck(ack)
      if (!line.startsWith('AA')) failed += 1
      console.log(`${file}: ${line}`)
    }
  }
  if (failed) console.log(`${failed} message(s) not accepted (AE: waiting in Set-up → Interfaces; AR: refused)`)
}

main().catch((err: Error) => {
  console.error(
    `hl7:send: ${err.message} (is Ferrolane running with HL7_MLLP_ENABLED, on ` +
      `${process.env.HL7_MLLP_HOST ?? '127.0.0.1'}:${process.env.HL7_MLLP_PORT ?? 2575}?)`,
  )
  process.exit(1)
})
