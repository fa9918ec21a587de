import { describe, expect, it } from 'vitest'
import { cachedCount, forgetWorklistCounts, worklistChanged } from '../../../server/services/worklistCounts'

/** A count the test answers when it chooses, counting how often it was asked. */
function gate(answers: number[]) {
  let calls = 0
  const waiting: ((n: number) => void)[] = []
  const count = () => {
    calls += 1
    return new Promise<number>((resolve) => waiting.push(resolve))
  }
  const answerAll = () => waiting.splice(0).forEach((resolve, i) => resolve(answers[i] ?? -1))
  return { count, answerAll, calls: () => calls }
}

describe('worklist totals counted once for requests that miss together', () => {
  it('when requests miss the same total while it is being counted, then they share one count', async () => {
    forgetWorklistCounts()
    const g = gate([41])
    const both = Promise.all([cachedCount('k1', ['referral'], g.count), cachedCount('k1', ['referral'], g.count)])
    g.answerAll()
    expect(await both).toEqual([41, 41])
    expect(g.calls()).toBe(1)
    // Kept afterwards: the next request reads no count at all.
    expect(await cachedCount('k1', ['referral'], g.count)).toBe(41)
    expect(g.calls()).toBe(1)
  })

  it('when this process writes while a total is being counted, then a later request counts again and nothing is kept', async () => {
    forgetWorklistCounts()
    const g = gate([7, 8])
    const first = cachedCount('k2', ['referral'], g.count)
    worklistChanged('referral')
    const second = cachedCount('k2', ['referral'], g.count)
    expect(g.calls()).toBe(2)
    g.answerAll()
    expect([await first, await second]).toEqual([7, 8])
    // The first count started before the change; only the second, started after it, is kept.
    const third = cachedCount('k2', ['referral'], g.count)
    expect(g.calls()).toBe(2)
    expect(await third).toBe(8)
  })

  it('when a change touches another source, then an in-flight total of referrals only is still shared', async () => {
    forgetWorklistCounts()
    const g = gate([3])
    const first = cachedCount('k3', ['referral'], g.count)
    worklistChanged('patient')
    const second = cachedCount('k3', ['referral'], g.count)
    g.answerAll()
    expect([await first, await second]).toEqual([3, 3])
    expect(g.calls()).toBe(1)
  })
})
