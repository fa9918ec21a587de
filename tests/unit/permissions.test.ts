import { describe, expect, it } from 'vitest'
import {
  PERMISSIONS,
  allows,
  isAction,
  isOperatingSurgeon,
  maySeeEpisode,
  rolesFor,
  seesOwnPatientsOnly,
  type Action,
} from '../../shared/permissions'
import { ROLES } from '../../shared/roles'
import { TRANSITIONS } from '../../shared/pathway/transitions'

const ACTIONS = Object.keys(PERMISSIONS) as Action[]

/**
 * Everything that reads or writes a named patient's data. Least privilege (issue 15, ASVS 4.1.3):
 * an administrator does none of it; the HL7 overview and message list are the exception, and they
 * leave the patient out for administrators (hl7.patientDetail).
 */
const PATIENT_DATA: Action[] = [
  'records.read',
  'records.write',
  'results.write',
  'operations.cancel',
  'pathway.move',
  'reviews.write',
  'prescriptions.plan',
  'prescriptions.sign',
  'administrations.record',
  'readiness.answer',
  'appointments.book',
  'outbox.read',
  'tasks.work',
  'outcomes.record',
  'transfusions.record',
  'documents.attach',
  'letters.write',
  'reports.patientRows',
  'imports.run',
  'hl7.patientDetail',
  'hl7.readMessage',
  'hl7.processAgain',
]

describe('the permission table', () => {
  it('when an administrator asks for anything that carries a patient, then the table says no', () => {
    expect(PATIENT_DATA.filter((a) => allows('admin', a))).toEqual([])
  })

  it('when no one is signed in, then only the public actions are open', () => {
    const open = ACTIONS.filter((a) => allows(null, a))
    expect(open.sort()).toEqual(['auth.signIn', 'health.read', 'replies.answer'])
  })

  it('when an action is "signed-in", then every staff role may do it', () => {
    for (const role of ROLES) expect(allows(role, 'auth.account'), role).toBe(true)
    expect(rolesFor('staff.list')).toEqual(ROLES)
  })

  it('then only a doctor prescribes, and only a surgeon answers the readiness projection', () => {
    expect(ROLES.filter((r) => allows(r, 'prescriptions.sign'))).toEqual(['doctor'])
    expect(ROLES.filter((r) => allows(r, 'readiness.answer'))).toEqual(['surgeon'])
  })

  it('then a name that is not in the table is not an action', () => {
    expect(isAction('records.read')).toBe(true)
    expect(isAction('records.delete')).toBe(false)
    expect(isAction('toString')).toBe(false)
  })

  it('then every pathway move takes its roles from its own action, and the move route lets all of them in', () => {
    for (const m of TRANSITIONS) {
      expect(m.roles, `${m.from} → ${m.to}`).toEqual(rolesFor(m.action))
      for (const role of m.roles) expect(allows(role, 'pathway.move'), `${role}: ${m.from} → ${m.to}`).toBe(true)
    }
  })
})

describe('the operating surgeon', () => {
  it('when a surgeon operates on the episode, then they are its operating surgeon and see it', () => {
    expect(isOperatingSurgeon({ role: 'surgeon', userId: 7 }, { surgeonId: 7 })).toBe(true)
    expect(maySeeEpisode({ role: 'surgeon', userId: 7 }, { surgeonId: 7 })).toBe(true)
  })

  it("when the episode is on another surgeon's list, then a surgeon does not see it", () => {
    expect(isOperatingSurgeon({ role: 'surgeon', userId: 7 }, { surgeonId: 8 })).toBe(false)
    expect(maySeeEpisode({ role: 'surgeon', userId: 7 }, { surgeonId: 8 })).toBe(false)
    expect(maySeeEpisode({ role: 'surgeon', userId: 7 }, { surgeonId: null })).toBe(false)
  })

  it('when the person is a nurse or doctor, then they see every episode but are no one’s operating surgeon', () => {
    for (const role of ['nurse', 'doctor'] as const) {
      expect(maySeeEpisode({ role, userId: 7 }, { surgeonId: 8 }), role).toBe(true)
      expect(isOperatingSurgeon({ role, userId: 8 }, { surgeonId: 8 }), role).toBe(false)
      expect(seesOwnPatientsOnly(role), role).toBe(false)
    }
    expect(seesOwnPatientsOnly('surgeon')).toBe(true)
  })
})
