import { describe, expect, it } from 'vitest'
import { ANALYTE_DEFS, normaliseUnit } from '../../../shared/pathway'

// The walk over every analyte's units that normaliseUnit did on each call before its spellings were
// kept in a map: the reference the map must agree with, spelling for spelling.
function walked(unit: string): string {
  const key = unit.trim().replace(/[µμ]/g, 'u').toLowerCase()
  for (const def of Object.values(ANALYTE_DEFS)) {
    for (const u of Object.keys(def.units)) if (u.replace('µ', 'u').toLowerCase() === key) return u
  }
  return unit.trim()
}

describe("a laboratory's spelling of a unit", () => {
  it(
    'when every accepted unit is spelt in upper and lower case, with µ, μ or u and padded, ' +
      'then the stored spelling is the same as before',
    () => {
      const spellings = Object.values(ANALYTE_DEFS).flatMap((d) =>
        Object.keys(d.units).flatMap((u) => [
          u,
          u.toUpperCase(),
          u.toLowerCase(),
          u.replace('µ', 'μ'),
          u.replace('µ', 'u'),
          ` ${u.replace('µ', 'U')} `,
        ]),
      )
      expect(spellings.length).toBeGreaterThan(40)
      for (const s of spellings) expect(normaliseUnit(s), s).toBe(walked(s))
      expect(normaliseUnit('umol/l')).toBe('µmol/L')
      expect(normaliseUnit('G/DL')).toBe('g/dL')
    },
  )

  it('when a unit is not one Ferrolane accepts, then it comes back trimmed and unchanged', () => {
    for (const s of [' mg/dl/h ', 'mmol', '', 'μg', 'µµmol/L']) expect(normaliseUnit(s), s).toBe(walked(s))
    expect(normaliseUnit(' furlongs ')).toBe('furlongs')
  })
})
