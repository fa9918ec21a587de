import { describe, expect, it } from 'vitest'
import { hbAxisDomain, hbAxisTicks, scaleX, scaleY, ticksAt } from '../../../src/display/chartScale'

describe('chart axes', () => {
  it('when Hb values run 95–130 g/L, then the axis is 80–140 on a 10 g/L grid', () => {
    const d = hbAxisDomain([95, 112, 130])
    expect(d).toEqual({ lo: 80, hi: 140 })
    expect(hbAxisTicks(d)).toEqual([80, 90, 100, 110, 120, 130, 140])
  })

  it('when the axis spans more than 80 g/L, then ticks are every 20', () => {
    expect(hbAxisTicks({ lo: 60, hi: 160 })).toEqual([60, 80, 100, 120, 140, 160])
  })

  it('then the scales put the ends of the domain on the margins, with larger values higher up', () => {
    const m = { left: 50, right: 10, top: 10, bottom: 30 }
    const x = scaleX({ lo: 0, hi: 10 }, 260, m)
    const y = scaleY({ lo: 60, hi: 160 }, 240, m)
    expect([x(0), x(10), x(5)]).toEqual([50, 250, 150])
    expect([y(60), y(160)]).toEqual([210, 10])
    expect(ticksAt({ lo: 0, hi: 100 }, [0.1, 0.5])).toEqual([10, 50])
  })
})
