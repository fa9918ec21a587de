/**
 * The writes of one transaction, sent one at a time on its connection: each only once the one before it has
 * answered. After a failed write nothing more is sent: a deadlock has rolled the transaction back, and a write
 * already sent behind it would have run outside the transaction, on its own.
 *
 * Reads do not go through here. They go straight onto the connection, which runs statements in the order they
 * are sent, so a read waits behind at most the one write in flight, and it sees every write that answered before
 * it was sent.
 *
 * Two lanes, so that the server computes (the rules, the next rows) while MariaDB runs a write, instead of the
 * two taking turns (issue #19, an import's per-episode work):
 * - `now`: a write the caller waits for, because its next step needs it answered. It goes before the other lane.
 * - `whenIdle`: work nothing waits for until `drained` (a pre-aggregate's refresh, audit rows), sent whenever no
 *   `now` write is waiting. Such a step must not depend on a `now` write queued after it.
 */
export class SerialWrites {
  private readonly waitedFor: Step[] = []
  private readonly background: Step[] = []
  private inFlight = false
  private failure: { err: unknown } | null = null

  /** Sends `write` after the writes already waited for; resolves with its answer. */
  now<T>(write: () => Promise<T>): Promise<T> {
    return new Promise<T>((resolve, reject) => {
      this.waitedFor.push({ write, resolve: resolve as (v: unknown) => void, reject })
      this.pump()
    })
  }

  /** Queues `write` behind every background step; a failure is reported by `drained`. */
  whenIdle(write: () => Promise<unknown>): void {
    this.background.push({ write, resolve: () => undefined, reject: () => undefined })
    this.pump()
  }

  /** Resolves once every write queued so far has answered; rejects with the first failure, if any. */
  drained(): Promise<void> {
    return new Promise<void>((resolve, reject) => {
      this.background.push({ write: async () => undefined, resolve: () => resolve(), reject })
      this.pump()
    })
  }

  private pump(): void {
    if (this.inFlight) return
    const step = this.waitedFor.shift() ?? this.background.shift()
    if (!step) return
    if (this.failure) {
      // Nothing more is sent: every queued step fails with the first failure.
      step.reject(this.failure.err)
      this.pump()
      return
    }
    this.inFlight = true
    Promise.resolve()
      .then(step.write)
      .then(
        (answer) => {
          this.inFlight = false
          step.resolve(answer)
          this.pump()
        },
        (err: unknown) => {
          this.inFlight = false
          this.failure = { err }
          step.reject(err)
          this.pump()
        },
      )
  }
}

interface Step {
  write: () => Promise<unknown>
  resolve: (answer: unknown) => void
  reject: (err: unknown) => void
}
