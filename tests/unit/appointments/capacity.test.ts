import { describe, expect, it } from 'vitest'
import { freeSlots, peakOverlap } from '../../../shared/appointments'

const m = (hhmm: string) => {
  const [h, mi] = hhmm.split(':').map(Number)
  return (h! * 60 + mi!) * 60_000
}
const span = (a: string, b: string) => ({ startMs: m(a), endMs: m(b) })

describe('infusion chairs in use', () => {
  it('when two visits follow each other, then they share one chair', () => {
    expect(peakOverlap([span('09:00', '10:00'), span('10:00', '11:00')], span('09:00', '11:00'))).toBe(1)
  })

  it('when visits overlap in part, then the peak counts only those running at once', () => {
    const booked = [span('09:00', '10:00'), span('09:30', '10:30'), span('10:15', '11:00')]
    expect(peakOverlap(booked, span('09:00', '11:00'))).toBe(2)
    expect(peakOverlap(booked, span('10:30', '11:00'))).toBe(1)
  })

  it("when a session is full at the asked time, then the free starts that follow are offered, clear of the patient's own visits", () => {
    const session = { id: 7, chairs: 1, ...span('09:00', '12:00'), bookings: [span('09:00', '10:00')] }
    const slots = freeSlots([session], 60, m('09:00'), [span('10:00', '10:30')])
    expect(slots.map((s) => s.startMs)).toEqual([m('10:30'), m('10:45'), m('11:00')])
    expect(slots[0]!.sessionId).toBe(7)
  })
})
