import type { Hl7Message } from '@medplum/core'
import type { Sequelize } from 'sequelize'
import type { Config } from '../../config'
import { receiveBatch } from './inbox'

interface Waiting {
  msg: Hl7Message
  sender: unknown
  resolve: (ack: string) => void
  reject: (err: unknown) => void
}

/** Messages taken into one transaction at most: bounds the locks a batch holds and its replay on a conflict. */
const MAX_BATCH = 16
/**
 * How long a batch waits at most for the senders the last batch answered. A sender that waits for
 * each ACK (as MLLP senders do) sends its next message a moment after its answer; without the wait
 * the first one back starts a batch of one and the others queue behind it (batches of 1 and 3
 * instead of 4 with four such senders), and a batch costs nearly the same statements whatever its size.
 */
const LINGER_MS = 3

/**
 * Group commit for the MLLP listener. Every connection hands its next message here and waits for
 * its ACK; while one batch is being stored, the messages that arrive on any connection wait and
 * are stored together in the next transaction (one commit, one log flush, instead of one each).
 * A lone message is not held back, except for the senders the last batch answered: the batch waits
 * for them (LINGER_MS at most) so that they are stored together again. Each ACK is given only
 * after the commit that stored its message (receiveBatch); a message whose storing failed gets
 * its own error, and the others of its batch are not failed with it.
 */
export class GroupCommit {
  private waiting: Waiting[] = []
  private busy = false
  // Senders answered by the last batch that have not sent again yet, and the timer that stops waiting for them.
  private expected = new Set<unknown>()
  private linger: NodeJS.Timeout | null = null
  // How batching went (transactions, messages, the largest batch): for the tests and the bench's notes.
  readonly stats = { batches: 0, messages: 0, largest: 0 }

  constructor(
    private readonly sequelize: Sequelize,
    private readonly config: Config,
    private readonly maxBatch = MAX_BATCH,
  ) {}

  /** `sender`: the connection (any value that stays the same for it), so a batch can wait for the senders it expects back. */
  submit(msg: Hl7Message, sender: unknown = null): Promise<string> {
    return new Promise<string>((resolve, reject) => {
      this.expected.delete(sender)
      this.waiting.push({ msg, sender, resolve, reject })
      this.next()
    })
  }

  private next(): void {
    if (this.busy || !this.waiting.length) return
    if (this.expected.size && this.waiting.length < this.maxBatch) {
      this.linger ??= setTimeout(() => {
        this.expected.clear()
        this.linger = null
        this.next()
      }, LINGER_MS)
      return
    }
    if (this.linger) clearTimeout(this.linger)
    this.linger = null
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
        // A sender whose next message is already here (it sent two at once) is not waited for.
        const back = new Set(this.waiting.map((w) => w.sender))
        this.expected = new Set(batch.map((w) => w.sender).filter((s) => s !== null && !back.has(s)))
        this.next()
      })
  }
}
