import type { Hl7Message } from '@medplum/core'
import type { Sequelize } from 'sequelize'
import type { Config } from '../../config'
import { receiveBatch } from './inbox'

interface Waiting {
  msg: Hl7Message
  resolve: (ack: string) => void
  reject: (err: unknown) => void
}

/** Messages taken into one transaction at most: bounds the locks a batch holds and its replay on a conflict. */
const MAX_BATCH = 16

/**
 * Group commit for the MLLP listener. Every connection hands its next message here and waits for
 * its ACK; while one batch is being stored, the messages that arrive on any connection wait and
 * are stored together in the next transaction (one commit, one log flush, instead of one each).
 * A lone message is not held back: the first one starts a batch at once. Each ACK is given only
 * after the commit that stored its message (receiveBatch); a message whose storing failed gets
 * its own error, and the others of its batch are not failed with it.
 */
export class GroupCommit {
  private waiting: Waiting[] = []
  private busy = false
  // How batching went (transactions, messages, the largest batch): for the tests and the bench's notes.
  readonly stats = { batches: 0, messages: 0, largest: 0 }

  constructor(
    private readonly sequelize: Sequelize,
    private readonly config: Config,
    private readonly maxBatch = MAX_BATCH,
  ) {}

  submit(msg: Hl7Message): Promise<string> {
    return new Promise<string>((resolve, reject) => {
      this.waiting.push({ msg, resolve, reject })
      this.next()
    })
  }

  private next(): void {
    if (this.busy || !this.waiting.length) return
    this.busy = true
    const batch = this.waiting.splice(0, this.maxBatch)
    this.stats.batches += 1
    this.stats.messages += batch.length
    this.stats.largest = Math.max(this.stats.largest, batch.length)
    void receiveBatch(
      this.sequelize,
      this.config,
      batch.map((w) => w.msg),
    )
      .then(
        (outcomes) => outcomes.forEach((o, i) => (o.status === 'fulfilled' ? batch[i]!.resolve(o.value) : batch[i]!.reject(o.reason))),
        (err: unknown) => batch.forEach((w) => w.reject(err)),
      )
      .finally(() => {
        this.busy = false
        this.next()
      })
  }
}
