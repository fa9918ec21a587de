import type { OutcomeWarning } from '../reports/outcomeWarnings'
import type { Complication, TXA_TIMINGS } from '../schemas/outcomes'

/*
 * The post-operative outcome API's answers (server/services/outcomes.ts). The server's mapper
 * declares these as its return types and the client imports them.
 */

export type TxaTiming = (typeof TXA_TIMINGS)[number]

/** The check of the Hb after surgery, once recorded. */
export interface FollowUpView {
  recheckHbGL: number | null
  recheckDate: string | null
  ironAfterSurgery: boolean | null
  notes: string | null
  recordedAt: string | null
}

/** The operation's outcome as recorded after surgery. */
export interface OutcomeView {
  id: number
  referralId: number
  surgeryDate: string
  bloodLossMl: number
  unitsTransfusedIntraOp: number
  unitsTransfusedPostOp: number
  unitsCrossmatched: number
  lowestHbGL: number
  dischargeHbGL: number | null
  lengthOfStayDays: number
  complications: Complication[]
  tranexamicAcidGiven: boolean | null
  tranexamicAcidDoseMg: number | null
  tranexamicAcidTiming: TxaTiming | null
  cellSalvageUsed: boolean | null
  cellSalvageReturnedMl: number | null
  transfusionInformationGiven: boolean | null
  transfusionConsent: boolean | null
  postOperativeIronGiven: boolean | null
  followUp: FollowUpView | null
}

/** GET and POST /api/referrals/:id/outcome: the outcome, what in it needs a second look, and the episode's version. */
export interface OutcomeRead {
  outcome: OutcomeView
  warnings: OutcomeWarning[]
  version: number
}

/** POST /api/referrals/:id/follow-up */
export interface FollowUpRecorded {
  outcome: OutcomeView
  version: number
}
