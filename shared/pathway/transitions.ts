import type { Role } from '../roles'
import { rolesFor, type Action } from '../permissions'
import { PRE_OPERATIVE_STAGES, READ_ONLY_STAGES, STAGE_LABELS, type Stage } from './stages'

/**
 * Something that must already be true of the referral for the move to be made: an Hb result
 * before screening; the post-operative record and its follow-up before closing after surgery.
 */
export type MoveRequirement = 'hb-result' | 'follow-up'

export interface Move {
  from: Stage
  to: Stage
  /** The action in the permission table (shared/permissions.ts) that this move needs. */
  action: Action
  roles: readonly Role[]
  requiresReason?: boolean
  requires?: MoveRequirement
}

type MoveRule = Omit<Move, 'roles'>
const move = (m: MoveRule): Move => ({ ...m, roles: rolesFor(m.action) })

/** Side exits are possible from every stage before surgery. */
function sideExits(from: Stage): Move[] {
  return [
    // Postponing surgery is a clinical decision (clinic doctor) or the operating surgeon's.
    move({ from, to: 'deferred', action: 'pathway.defer', requiresReason: true }),
    // Withdrawal records a fact (patient declined, operation cancelled) anyone caring for them may learn.
    move({ from, to: 'withdrawn', action: 'pathway.withdraw', requiresReason: true }),
  ]
}

/**
 * The allowed moves, as data: the server enforces exactly this table and the client offers
 * exactly these actions. A move not listed here is refused (422); a listed move by a role not
 * named in it is forbidden (403).
 */
export const TRANSITIONS: readonly Move[] = [
  // Screening confirmation: pre-assessment nurses or clinic doctors.
  move({ from: 'referred', to: 'screened', action: 'pathway.advance', requires: 'hb-result' }),
  move({ from: 'screened', to: 'clinic', action: 'pathway.advance' }),
  move({ from: 'screened', to: 'cleared', action: 'pathway.advance' }),
  // Clinic decisions: doctors only.
  move({ from: 'clinic', to: 'treating', action: 'pathway.decide' }),
  move({ from: 'clinic', to: 'recheck', action: 'pathway.decide' }),
  move({ from: 'clinic', to: 'cleared', action: 'pathway.decide' }),
  move({ from: 'treating', to: 'recheck', action: 'pathway.advance' }),
  move({ from: 'recheck', to: 'treating', action: 'pathway.decide' }),
  move({ from: 'recheck', to: 'clinic', action: 'pathway.decide' }),
  move({ from: 'recheck', to: 'cleared', action: 'pathway.decide' }),
  // New results after clearance can send a patient back for review.
  move({ from: 'cleared', to: 'clinic', action: 'pathway.advance' }),
  move({ from: 'cleared', to: 'operated', action: 'pathway.recordOperation' }),
  move({ from: 'operated', to: 'closed', action: 'pathway.advance', requires: 'follow-up' }),
  ...PRE_OPERATIVE_STAGES.flatMap(sideExits),
  // A postponed patient comes back in: re-screened, or straight to clinic by a doctor.
  move({ from: 'deferred', to: 'referred', action: 'pathway.advance' }),
  move({ from: 'deferred', to: 'clinic', action: 'pathway.decide' }),
  move({ from: 'deferred', to: 'withdrawn', action: 'pathway.withdraw', requiresReason: true }),
  move({ from: 'withdrawn', to: 'closed', action: 'pathway.advance' }),
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
