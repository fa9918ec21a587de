import { CROSSMATCH_TRANSFUSION_RATE } from './rules'
import type { BloodOrderKind } from './readiness'

export type BloodOrderRule =
  'declines-transfusion' | 'antibodies' | 'red-cell-volume' | 'catalogue-order' | 'catalogue-rate' | 'group-and-screen'

export interface BloodOrderInput {
  /** Units by the red-cell-volume method, from the Hb the plan rests on (never an assumed rise). */
  calculatedUnits: number
  procedure: { name: string; usualBloodOrder: string; usualUnits: number; transfusionRate: number | null }
  /** Positive red-cell antibody screen recorded on the episode (null: not recorded). */
  antibodiesPositive: boolean | null
  declinesTransfusion: boolean
}

export interface BloodOrderDecision {
  kind: BloodOrderKind
  units: number
  /** The rule that decided, and in words. */
  rule: BloodOrderRule
  decidedBy: string
  /** Every rule that was considered, in the order it was tried, with what it said. */
  considered: string[]
  notes: string[]
}

const unitsText = (n: number) => `${n} unit${n === 1 ? '' : 's'}`

/**
 * The blood to have ready, from the patient's own calculation and the operation's catalogue
 * entry: the largest order any rule asks for wins, so no single rule can lower what another
 * found necessary. A patient's refusal of transfusion overrides every order (no units are
 * prepared against their wishes) and a positive antibody screen forces a crossmatch.
 */
export function decideBloodOrder(b: BloodOrderInput): BloodOrderDecision {
  const considered: string[] = []
  const notes: string[] = []
  const catalogueCrossmatch = b.procedure.usualBloodOrder === 'crossmatch'
  const rate = b.procedure.transfusionRate
  const rateHigh = rate !== null && rate >= CROSSMATCH_TRANSFUSION_RATE

  considered.push(
    b.calculatedUnits > 0 ? `Red-cell-volume estimate: ${unitsText(b.calculatedUnits)}.` : 'Red-cell-volume estimate: no units needed.',
  )
  considered.push(
    catalogueCrossmatch
      ? `Catalogue order for ${b.procedure.name}: crossmatch ${unitsText(b.procedure.usualUnits)}.`
      : `Catalogue order for ${b.procedure.name}: group and screen.`,
  )
  considered.push(
    rate === null
      ? 'Catalogue transfusion rate: not recorded.'
      : `Catalogue transfusion rate: ${Math.round(rate * 100)} % of patients (local policy: crossmatch at ` +
          `${Math.round(CROSSMATCH_TRANSFUSION_RATE * 100)} % or more).`,
  )
  if (b.antibodiesPositive) considered.push('Red-cell antibody screen: positive.')

  if (b.declinesTransfusion) {
    notes.push(
      'The patient declines transfusion: no red cells are to be crossmatched unless the patient gives fresh consent. Group and ' +
        'screen only if the patient agrees to the sample.',
    )
    if (b.antibodiesPositive) notes.push('Red-cell antibodies are also recorded: tell the transfusion laboratory, in case consent changes.')
    return {
      kind: 'group-and-screen',
      units: 0,
      rule: 'declines-transfusion',
      decidedBy: 'The patient declines transfusion (recorded on the episode).',
      considered,
      notes,
    }
  }

  const wanted = Math.max(b.calculatedUnits, catalogueCrossmatch ? b.procedure.usualUnits : 0)
  if (b.antibodiesPositive) {
    notes.push(
      'Tell the transfusion laboratory now: finding antigen-negative units can take hours to days, so send the crossmatch ' +
        'sample well before the day (local policy).',
    )
    return {
      kind: 'crossmatch',
      units: Math.max(1, wanted),
      rule: 'antibodies',
      decidedBy: 'Positive red-cell antibody screen: crossmatch is required.',
      considered,
      notes,
    }
  }
  if (b.calculatedUnits > 0 && b.calculatedUnits >= (catalogueCrossmatch ? b.procedure.usualUnits : 0)) {
    return {
      kind: 'crossmatch',
      units: b.calculatedUnits,
      rule: 'red-cell-volume',
      decidedBy: "This patient's red-cell-volume estimate.",
      considered,
      notes,
    }
  }
  if (catalogueCrossmatch) {
    return {
      kind: 'crossmatch',
      units: Math.max(1, wanted),
      rule: 'catalogue-order',
      decidedBy: `The operations catalogue's usual order for ${b.procedure.name}.`,
      considered,
      notes,
    }
  }
  if (rateHigh) {
    return {
      kind: 'crossmatch',
      units: Math.max(1, wanted),
      rule: 'catalogue-rate',
      decidedBy: `The operation's transfusion rate (${Math.round(rate! * 100)} %), local policy.`,
      considered,
      notes,
    }
  }
  return {
    kind: 'group-and-screen',
    units: 0,
    rule: 'group-and-screen',
    decidedBy: 'No rule asks for crossmatched units: group and screen.',
    considered,
    notes,
  }
}
