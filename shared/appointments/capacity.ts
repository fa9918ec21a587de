/**
 * Chairs in an infusion session: how many patients sit at once. Bookings of different
 * lengths share chairs, so the test is the peak overlap inside the wanted slot, not a count.
 */
export interface Span {
  startMs: number
  endMs: number
}

/** Most bookings running at the same moment within `slot`. */
export function peakOverlap(bookings: Span[], slot: Span): number {
  const edges: [number, number][] = []
  for (const b of bookings) {
    const s = Math.max(b.startMs, slot.startMs)
    const e = Math.min(b.endMs, slot.endMs)
    if (s < e) edges.push([s, 1], [e, -1])
  }
  // Ends sort before starts at the same instant: a chair freed at 10:00 can be reused at 10:00.
  edges.sort((a, b) => a[0] - b[0] || a[1] - b[1])
  let now = 0
  let peak = 0
  for (const [, step] of edges) {
    now += step
    peak = Math.max(peak, now)
  }
  return peak
}

export function overlaps(a: Span, b: Span): boolean {
  return a.startMs < b.endMs && b.startMs < a.endMs
}

export interface SessionLoad extends Span {
  id: number
  chairs: number
  bookings: Span[]
}

/** Offered start times step through a session on this grid. */
export const SLOT_STEP_MIN = 15

/**
 * The first free starts for a visit of `durationMin`, from `notBeforeMs` on, across the given
 * sessions (in time order); `busy` are the patient's own other visits, which must not clash.
 */
export function freeSlots(
  sessions: SessionLoad[],
  durationMin: number,
  notBeforeMs: number,
  busy: Span[],
  limit = 3,
): { sessionId: number; startMs: number; endMs: number }[] {
  const out: { sessionId: number; startMs: number; endMs: number }[] = []
  const len = durationMin * 60_000
  for (const s of sessions) {
    for (let start = s.startMs; start + len <= s.endMs; start += SLOT_STEP_MIN * 60_000) {
      if (start < notBeforeMs) continue
      const slot = { startMs: start, endMs: start + len }
      if (busy.some((b) => overlaps(b, slot))) continue
      if (peakOverlap(s.bookings, slot) >= s.chairs) continue
      out.push({ sessionId: s.id, ...slot })
      if (out.length >= limit) return out
    }
  }
  return out
}
