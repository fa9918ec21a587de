import net from 'node:net'
import { Hl7Message } from '@medplum/core'
import { Hl7Connection, type Hl7ErrorEvent, type Hl7MessageEvent } from '@medplum/hl7'
import type { Sequelize } from 'sequelize'
import type { Hl7ListenerState } from '../../../shared/hl7'
import type { Config } from '../../config'
import { buildAck, Hl7Problem, rejectUnreadable } from './ack'
import { GroupCommit } from './groupCommit'
import { deleteExpired } from './messages'

// MLLP's end of block (FS CR): counted only to measure and time the frame in progress.
const FS = 0x1c
const CR = 0x0d

/**
 * The MLLP listener. Framing and parsing are @medplum/hl7's (Hl7Connection over our own socket,
 * so we choose the address and can enforce limits on the bytes before they are framed): a
 * message over the size limit, a frame left unfinished past the partial timeout, or a silent
 * connection past the idle timeout closes that connection; bytes of an unfinished frame are
 * never processed, so a dropped connection stores nothing. Each connection's messages are
 * answered in order; no input reaches the process as an unhandled error.
 */
let running: MllpListener | null = null

/** The listener's state for the Interfaces screen (this process's listener, if it runs one). */
export function listenerState(config: Config): Hl7ListenerState {
  if (running) return running.state()
  const c = config.hl7
  return {
    enabled: c.enabled,
    listening: false,
    host: c.host,
    port: null,
    connections: 0,
    maxMessageBytes: c.maxMessageBytes,
    retentionDays: c.retentionDays,
  }
}

export class MllpListener {
  private server: net.Server | null = null
  private readonly sockets = new Set<net.Socket>()
  private sweep: NodeJS.Timeout | null = null
  // Messages waiting on any connection are stored together, one transaction per batch.
  private readonly inbox: GroupCommit

  constructor(
    private readonly sequelize: Sequelize,
    private readonly config: Config,
    private readonly log: (msg: string, err?: unknown) => void = () => {},
  ) {
    this.inbox = new GroupCommit(sequelize, config)
  }

  async start(): Promise<number> {
    const server = net.createServer((socket) => this.accept(socket))
    server.maxConnections = this.config.hl7.maxConnections
    server.on('error', (err) => this.log('[hl7] listener error', err))
    await new Promise<void>((resolve, reject) => {
      server.once('error', reject)
      server.listen(this.config.hl7.port, this.config.hl7.host, () => {
        server.off('error', reject)
        resolve()
      })
    })
    this.server = server
    // The one listener of this process, for listenerState(); not an alias kept for a closure.
    // eslint-disable-next-line @typescript-eslint/no-this-alias -- a module-level registry, not a `self` alias
    running = this
    const sweep = () =>
      void deleteExpired(this.config.hl7.retentionDays).catch((err: Error) => this.log('[hl7] retention sweep failed', err))
    sweep()
    this.sweep = setInterval(sweep, 60 * 60_000)
    this.sweep.unref()
    return this.port()!
  }

  /** How group commit batched the messages so far (transactions, messages, the largest batch). */
  batchStats(): { batches: number; messages: number; largest: number } {
    return { ...this.inbox.stats }
  }

  port(): number | null {
    const a = this.server?.address()
    return a && typeof a === 'object' ? a.port : null
  }

  state(): Hl7ListenerState {
    const c = this.config.hl7
    return {
      enabled: c.enabled,
      listening: this.server?.listening ?? false,
      host: c.host,
      port: this.port(),
      connections: this.sockets.size,
      maxMessageBytes: c.maxMessageBytes,
      retentionDays: c.retentionDays,
    }
  }

  async stop(): Promise<void> {
    if (this.sweep) clearInterval(this.sweep)
    const server = this.server
    this.server = null
    if (running === this) running = null
    for (const s of this.sockets) s.destroy()
    if (server) await new Promise<void>((resolve) => server.close(() => resolve()))
  }

  private accept(socket: net.Socket): void {
    const limits = this.config.hl7
    this.sockets.add(socket)
    socket.on('close', () => {
      this.sockets.delete(socket)
      if (partialTimer) clearTimeout(partialTimer)
    })
    const idleMs = limits.idleTimeoutSeconds * 1000
    socket.setTimeout(idleMs, () => socket.destroy())
    // A connection waiting for its ACK is not idle: the wait is ours (its message may be in a batch behind others).
    let unanswered = 0
    const waiting = (delta: 1 | -1) => {
      unanswered += delta
      if (!socket.destroyed) socket.setTimeout(unanswered > 0 ? 0 : idleMs)
    }
    let pending = 0
    let lastWasFs = false
    let partialTimer: NodeJS.Timeout | null = null
    let tooLarge = false
    // Registered before Hl7Connection's own listener, so an oversize frame is cut before it is buffered further.
    socket.on('data', (chunk: Buffer) => {
      // Checked byte by byte: a whole oversize frame can arrive in one chunk (a busy machine joins the writes).
      let over = false
      for (let i = 0; i < chunk.length; i++) {
        const b = chunk[i]!
        pending = lastWasFs && b === CR ? 0 : pending + 1
        lastWasFs = b === FS
        if (pending > limits.maxMessageBytes + 1) over = true
      }
      if (over || tooLarge) {
        if (tooLarge) return
        tooLarge = true
        conn.send(Hl7Message.parse(rejectUnreadable(`message exceeds ${limits.maxMessageBytes} bytes; connection closed`)))
        socket.end()
        // The rest of the frame is not read; a peer that keeps sending is cut off.
        setTimeout(() => socket.destroy(), 200).unref()
        return
      }
      if (pending > 0 && !partialTimer) partialTimer = setTimeout(() => socket.destroy(), limits.partialTimeoutSeconds * 1000)
      if (pending === 0 && partialTimer) {
        clearTimeout(partialTimer)
        partialTimer = null
      }
    })
    const conn = new Hl7Connection(socket)
    let queue = Promise.resolve()
    conn.addEventListener('message', (event: Hl7MessageEvent) => {
      // The parser may still frame an oversize message from the chunk that was refused above: it is never processed.
      if (tooLarge) return
      waiting(1)
      queue = queue
        .then(async () => {
          try {
            // This connection's next message is handed over only after this one's ACK: its order is kept.
            const ack = await this.inbox.submit(event.message, socket)
            if (!socket.destroyed) conn.send(Hl7Message.parse(ack))
          } catch (err) {
            this.log('[hl7] message could not be processed', err)
            // Nothing was stored (the transaction rolled back): AE tells the sender to send it again.
            const problem = new Hl7Problem(
              'AE',
              'internal',
              'the message could not be processed now; nothing was stored; send it again later',
            )
            if (!socket.destroyed) conn.send(Hl7Message.parse(buildAck(event.message, 'AE', problem)))
          } finally {
            waiting(-1)
          }
        })
        .catch(this.lost(socket))
    })
    conn.addEventListener('error', (event: Hl7ErrorEvent) => {
      const err = event.error as Error & { code?: string }
      // Socket errors (a peer that reset) need no answer; a frame that was not HL7 gets an AR.
      if (err.code || socket.destroyed) return
      queue = queue
        .then(() => {
          if (!socket.destroyed)
            conn.send(Hl7Message.parse(rejectUnreadable(`the frame is not a readable HL7 v2 message (${err.message})`)))
        })
        .catch(this.lost(socket))
    })
  }

  /** Whatever fails while answering closes that one connection (the sender will resend); the queue and the process go on. */
  private lost(socket: net.Socket): (err: unknown) => void {
    return (err) => {
      this.log('[hl7] connection closed after an error', err)
      socket.destroy()
    }
  }
}
