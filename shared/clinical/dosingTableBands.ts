import { CLINICAL_LIMITS } from './limits'
import type { IronDosingTable } from './ironNeed'

/**
 * A dosing table as an admin edits it: each band with its own lower bound and upper bound
 * ("from" inclusive, "below" exclusive; the last band open). Stored tables keep only the lower
 * edges (IronDosingTable); this form lets a typing slip show up as a gap or an overlap, named
 * by the band it sits in, instead of silently moving a border.
 */
export interface DosingBand {
  from: number
  below: number | null
}
export interface DosingTableDraft {
  weightBands: DosingBand[]
  hbBands: DosingBand[]
  /** needMg[hbBand][weightBand], whole mg of iron. */
  needMg: number[][]
  source: string
}
export interface DosingTableProblem {
  /** The field path, as yup names it: e.g. table.needMg[1][2]. */
  path: string
  message: string
}

export const DOSING_TABLE_MAX_BANDS = 6

const num = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v)
const show = (v: number) => String(Math.round(v * 100) / 100)

/** How a clinician reads a band: "<35 kg", "35 to <70 kg", "≥70 kg". */
export function bandLabel(band: DosingBand, unit: string): string {
  if (band.below === null) return band.from === 0 ? 'all values' : `≥${show(band.from)} ${unit}`
  return band.from === 0 ? `<${show(band.below)} ${unit}` : `${show(band.from)} to <${show(band.below)} ${unit}`
}

function checkBands(kind: 'Weight' | 'Hb', key: string, bands: unknown, limit: { max: number }, unit: string): DosingTableProblem[] {
  const at = (i: number, part?: 'from' | 'below') => `table.${key}[${i}]${part ? `.${part}` : ''}`
  if (!Array.isArray(bands) || bands.length < 1 || bands.length > DOSING_TABLE_MAX_BANDS) {
    return [{ path: `table.${key}`, message: `${kind} bands: give 1 to ${DOSING_TABLE_MAX_BANDS} bands` }]
  }
  const problems: DosingTableProblem[] = []
  bands.forEach((raw, i) => {
    const b = (raw ?? {}) as Partial<DosingBand>
    const name = `${kind} band ${i + 1}`
    const last = i === bands.length - 1
    if (!num(b.from) || b.from < 0 || b.from > limit.max) {
      problems.push({ path: at(i, 'from'), message: `${name}: the lower bound must be a number from 0 to ${limit.max} ${unit}` })
      return
    }
    if (i === 0 && b.from !== 0)
      problems.push({
        path: at(i, 'from'),
        message: `${name}: the first band must start at 0 ${unit}, so that every patient falls in a band`,
      })
    if (last && b.below != null)
      problems.push({
        path: at(i, 'below'),
        message: `${name}: the last band must have no upper bound (it runs from ${show(b.from)} ${unit} up)`,
      })
    if (!last) {
      if (!num(b.below) || b.below > limit.max) {
        problems.push({
          path: at(i, 'below'),
          message: `${name}: give an upper bound up to ${limit.max} ${unit} (only the last band is open)`,
        })
        return
      }
      if (b.below <= b.from)
        problems.push({
          path: at(i, 'below'),
          message: `${name}: the upper bound (${show(b.below)} ${unit}) must be above the lower bound (${show(b.from)} ${unit})`,
        })
      const next = (bands[i + 1] ?? {}) as Partial<DosingBand>
      if (num(next.from) && next.from > b.below) {
        problems.push({
          path: at(i + 1, 'from'),
          message:
            `${kind} band ${i + 2}: starts at ${show(next.from)} ${unit} but band ${i + 1} ends below ${show(b.below)} ${unit}, a ` +
            `gap from ${show(b.below)} to ${show(next.from)} ${unit}`,
        })
      } else if (num(next.from) && next.from < b.below) {
        problems.push({
          path: at(i + 1, 'from'),
          message:
            `${kind} band ${i + 2}: starts at ${show(next.from)} ${unit}, inside band ${i + 1} (which runs below ${show(b.below)} ` +
            `${unit}): the bands overlap`,
        })
      }
    }
  })
  return problems
}

/** Every problem in a draft, each naming its band or cell; an empty list means the draft is sound. */
export function dosingTableProblems(draft: DosingTableDraft): DosingTableProblem[] {
  const L = CLINICAL_LIMITS
  const problems = [
    ...checkBands('Weight', 'weightBands', draft?.weightBands, L.weightKg, 'kg'),
    ...checkBands('Hb', 'hbBands', draft?.hbBands, L.hbGL, 'g/L'),
  ]
  if (typeof draft?.source !== 'string' || draft.source.trim().length < 3) {
    problems.push({ path: 'table.source', message: 'Source: name the product information the table comes from (section and date)' })
  }
  if (problems.length) return problems
  const { weightBands: w, hbBands: h, needMg } = draft
  if (!Array.isArray(needMg) || needMg.length !== h.length)
    return [...problems, { path: 'table.needMg', message: `The table needs ${h.length} rows (one per Hb band)` }]
  h.forEach((hb, i) => {
    const row = needMg[i]
    if (!Array.isArray(row) || row.length !== w.length) {
      problems.push({
        path: `table.needMg[${i}]`,
        message: `Row Hb ${bandLabel(hb, 'g/L')}: give ${w.length} values (one per weight band)`,
      })
      return
    }
    w.forEach((wb, j) => {
      const v = row[j]
      const { min, max } = L.productMaxTotalMg
      if (!num(v) || !Number.isInteger(v) || v < min || v > max) {
        problems.push({
          path: `table.needMg[${i}][${j}]`,
          message: `Hb ${bandLabel(hb, 'g/L')} × weight ${bandLabel(wb, 'kg')}: the need must be a whole number from ${min} to ${max} mg`,
        })
      }
    })
  })
  return problems
}

/** The stored form (lower edges); call only on a draft without problems. */
export function draftToTable(draft: DosingTableDraft): IronDosingTable {
  return {
    weightBandsKg: draft.weightBands.map((b) => b.from),
    hbBandsGL: draft.hbBands.map((b) => b.from),
    needMg: draft.needMg.map((row) => [...row]),
    source: draft.source.trim(),
  }
}

const toBands = (edges: number[]): DosingBand[] => edges.map((from, i) => ({ from, below: edges[i + 1] ?? null }))

/** The editing form of a stored table. */
export function tableToDraft(table: IronDosingTable): DosingTableDraft {
  return {
    weightBands: toBands(table.weightBandsKg),
    hbBands: toBands(table.hbBandsGL),
    needMg: table.needMg.map((row) => [...row]),
    source: table.source,
  }
}
