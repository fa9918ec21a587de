import type { Role } from '../roles'
import { PRE_OPERATIVE_STAGES, READ_ONLY_STAGES, STAGE_LABELS, type Stage } from './stages'

/**
 * Something that must already be true of the referral for the move to be made: an Hb result
 * before screening; the post-operative record and its follow-up before closing after surgery.
 */
export type MoveRequirement = 'hb-result' | 'follow-up'

export interface Move {
  from: Stage
  to: Stage
  roles: readonly Role[]
  requiresReason?: boolean
  requires?: MoveRequirement
}

const nurseOrDoctor: readonly Role[] = ['nurse', 'doctor']
const doctor: readonly Role[] = ['doctor']

/** Side exits are possible from every stage before surgery. */
function sideExits(from: Stage): Move[] {
  return [
    // Postponing surgery is a clinical decision (clinic doctor) or the operating surgeon's.
    { from, to: 'deferred', roles: ['doctor', 'surgeon'], requiresReason: true },
    // Withdrawal records a fact (patient declined, operation cancelled) anyone caring for them may learn.
    { from, to: 'withdrawn', roles: ['nurse', 'doctor', 'surgeon'], requiresReason: true },
  ]
}

/**
 * The allowed moves, as data: the server enforces exactly this table and the client offers
 * exactly these actions. A move not listed here is refused (422); a listed move by a role not
 * named in it is forbidden (403).
 */
export const TRANSITIONS: readonly Move[] = [
  // Screening confirmation: pre-assessment nurses or clinic doctors.
  { from: 'referred', to: 'screened', roles: nurseOrDoctor, requires: 'hb-result' },
  { from: 'screened', to: 'clinic', roles: nurseOrDoctor },
  { from: 'screened', to: 'cleared', roles: nurseOrDoctor },
  // Clinic decisions: doctors only.
  { from: 'clinic', to: 'treating', roles: doctor },
  { from: 'clinic', to: 'recheck', roles: doctor },
  { from: 'clinic', to: 'cleared', roles: doctor },
  { from: 'treating', to: 'recheck', roles: nurseOrDoctor },
  { from: 'recheck', to: 'treating', roles: doctor },
  { from: 'recheck', to: 'clinic', roles: doctor },
  { from: 'recheck', to: 'cleared', roles: doctor },
  // New results after clearance can send a patient back for review.
  { from: 'cleared', to: 'clinic', roles: nurseOrDoctor },
  { from: 'cleared', to: 'operated', roles: ['nurse', 'doctor', 'surgeon'] },
  { from: 'operated', to: 'closed', roles: nurseOrDoctor, requires: 'follow-up' },
  ...PRE_OPERATIVE_STAGES.flatMap(sideExits),
  // A postponed patient comes back in: re-screened, or straight to clinic by a doctor.
  { from: 'deferred', to: 'referred', roles: nurseOrDoctor },
  { from: 'deferred', to: 'clinic', roles: doctor },
  { from: 'deferred', to: 'withdrawn', roles: ['nurse', 'doctor', 'surgeon'], requiresReason: true },
  { from: 'withdrawn', to: 'closed', roles: nurseOrDoctor },
]

export function findMove(from: Stage, to: Stage): Move | undefined {
  return TRANSITIONS.find((m) => m.from === from && m.to === to)
}

export function isReadOnly(stage: Stage): boolean {
  return READ_ONLY_STAGES.includes(stage)
}

export interface AllowedMove {
  to: Stage
  label: string
  requiresReason: boolean
  requires: MoveRequirement | null
}

/** The moves this role may make from this stage (what the episode page offers). */
export function allowedMoves(stage: Stage, role: Role): AllowedMove[] {
  return TRANSITIONS.filter((m) => m.from === stage && m.roles.includes(role)).map((m) => ({
    to: m.to,
    label: STAGE_LABELS[m.to],
    requiresReason: m.requiresReason === true,
    requires: m.requires ?? null,
  }))
}

export function canMove(from: Stage, to: Stage, role: Role): boolean {
  return findMove(from, to)?.roles.includes(role) ?? false
}
