import { describe, expect, it } from 'vitest'
import { setImmediate as yieldToIo } from 'node:timers/promises'
import { SerialWrites } from '../../../server/services/serialWrites'

/** A fake write that records when it was sent and answers when told to (the order on one connection is what is tested). */
function recorder() {
  const sent: string[] = []
  let inFlight = 0
  let most = 0
  const write =
    (name: string, fail = false) =>
    async () => {
      sent.push(name)
      inFlight += 1
      most = Math.max(most, inFlight)
      await yieldToIo()
      inFlight -= 1
      if (fail) throw new Error(`${name} failed`)
      return name
    }
  return { sent, write, most: () => most }
}

describe('SerialWrites: one write at a time on a transaction connection', () => {
  it('when writes are queued in both lanes, then they are sent one at a time, waited-for writes first, background in order', async () => {
    const q = new SerialWrites()
    const r = recorder()
    q.whenIdle(r.write('bg1'))
    q.whenIdle(r.write('bg2'))
    const a = q.now(r.write('now1'))
    const b = q.now(r.write('now2'))
    expect(await a).toBe('now1')
    expect(await b).toBe('now2')
    await q.drained()
    // bg1 was already sent when the first `now` arrived (it was queued on an idle queue); nothing overtakes a write in flight.
    expect(r.sent).toEqual(['bg1', 'now1', 'now2', 'bg2'])
    expect(r.most()).toBe(1)
  })

  it('when a write fails, then nothing queued after it is sent, and drained and later writes fail with its error', async () => {
    const q = new SerialWrites()
    const r = recorder()
    q.whenIdle(r.write('bg1', true))
    q.whenIdle(r.write('bg2'))
    const later = q.now(r.write('now1'))
    await expect(later).rejects.toThrow('bg1 failed')
    await expect(q.drained()).rejects.toThrow('bg1 failed')
    await expect(q.now(r.write('now2'))).rejects.toThrow('bg1 failed')
    expect(r.sent).toEqual(['bg1'])
  })

  it('when a waited-for write fails, then the background writes behind it are never sent', async () => {
    const q = new SerialWrites()
    const r = recorder()
    const first = q.now(r.write('now1', true))
    q.whenIdle(r.write('bg1'))
    await expect(first).rejects.toThrow('now1 failed')
    await expect(q.drained()).rejects.toThrow('now1 failed')
    expect(r.sent).toEqual(['now1'])
  })

  it('when nothing was queued, then drained resolves at once', async () => {
    await expect(new SerialWrites().drained()).resolves.toBeUndefined()
  })

  it('when a write throws before returning a promise, then it counts as a failed write', async () => {
    const q = new SerialWrites()
    const r = recorder()
    const bad = q.now(() => {
      throw new Error('bad statement')
    })
    q.whenIdle(r.write('bg1'))
    await expect(bad).rejects.toThrow('bad statement')
    await expect(q.drained()).rejects.toThrow('bad statement')
    expect(r.sent).toEqual([])
  })
})
