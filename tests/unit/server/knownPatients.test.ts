import { describe, expect, it } from 'vitest'
import { KnownPatients } from '../../../server/services/imports/knownPatients'
import type { PatientMatch } from '../../../server/services/imports/match'

const patient = (mrn: string, referralId: number | null = 7): PatientMatch => ({
  mrn,
  patientId: 1,
  name: 'Ann Example',
  dob: '1960-05-15',
  sex: 'female',
  referralId,
})

describe('an import run remembers each MRN’s patient match', () => {
  it('when an MRN was asked, then its answer is held, a patient or no patient, and only unasked MRNs are sent again', () => {
    const known = new KnownPatients()
    // findPatients answers by the MRN in capitals; the file's own spelling is the key remembered.
    known.remember(['ab1', 'ZZ9'], new Map([['AB1', patient('AB1')]]))
    expect(known.get('ab1')).toMatchObject({ mrn: 'AB1', referralId: 7 })
    expect(known.get('ZZ9')).toBeNull()
    expect(known.get('AB1')).toBeUndefined()
    expect(known.unknown(['ab1', 'ZZ9', 'AB1', 'CD2'])).toEqual(['AB1', 'CD2'])
  })

  it('when the answers would pass the bound, then it starts again empty and never holds more than the bound', () => {
    const known = new KnownPatients(3)
    known.remember(['A', 'B'], new Map())
    known.remember(['C', 'D'], new Map([['C', patient('C')]]))
    expect(known.size).toBe(2)
    expect(known.get('A')).toBeUndefined()
    expect(known.get('C')).toMatchObject({ mrn: 'C' })
    known.remember(['E', 'F', 'G', 'H'], new Map())
    expect(known.size).toBe(3)
  })
})
