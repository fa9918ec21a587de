import { reactive, ref } from 'vue'
import { ValidationError } from 'yup'
import { DOSING_TABLE_MAX_BANDS, tableToDraft, type IronDosingTable } from '@shared/clinical'
import { dosingTableSchema, type DosingTableInput } from '@shared/schemas/dosingTable'

/** An editable band: the number fields are empty (null) until typed. */
export interface DraftBand {
  from: number | null
  below: number | null
}
export interface EditableTable {
  weightBands: DraftBand[]
  hbBands: DraftBand[]
  needMg: (number | null)[][]
  source: string
}

const blank = (): EditableTable => ({
  weightBands: [{ from: 0, below: null }],
  hbBands: [{ from: 0, below: null }],
  needMg: [[null]],
  source: '',
})

/**
 * The editor's working copy of a dosing table, with band add/remove that keeps the grid square.
 * Checked with the shared yup schema directly (not vee-validate fields) because its messages are
 * keyed by cell paths such as table.needMg[1][2] that no single field owns.
 */
export function useDosingTableDraft() {
  const draft = reactive<EditableTable>(blank())
  const dosedByTable = ref(false)
  const errors = ref<Record<string, string>>({})

  function load(table: IronDosingTable | null, inUse: boolean): void {
    Object.assign(draft, table ? tableToDraft(table) : blank())
    dosedByTable.value = inUse
    errors.value = {}
  }

  // A new band starts where the last one now ends; the last band stays open-ended.
  function addBand(kind: 'weightBands' | 'hbBands'): void {
    const bands = draft[kind]
    if (bands.length >= DOSING_TABLE_MAX_BANDS) return
    const last = bands[bands.length - 1]!
    bands.push({ from: last.below, below: null })
    if (kind === 'weightBands') draft.needMg.forEach((row) => row.push(null))
    else draft.needMg.push(draft.weightBands.map(() => null))
  }

  function removeBand(kind: 'weightBands' | 'hbBands', index: number): void {
    const bands = draft[kind]
    if (bands.length <= 1) return
    bands.splice(index, 1)
    if (kind === 'weightBands') draft.needMg.forEach((row) => row.splice(index, 1))
    else draft.needMg.splice(index, 1)
    bands[bands.length - 1]!.below = null
    if (index === 0) bands[0]!.from = 0
  }

  /** The payload if the shared schema accepts it; otherwise null, with every message in errors. */
  async function checked(): Promise<DosingTableInput | null> {
    try {
      const value = await dosingTableSchema.validate(
        { dosedByTable: dosedByTable.value, table: draft },
        { abortEarly: false, stripUnknown: true },
      )
      errors.value = {}
      return value
    } catch (err) {
      if (!(err instanceof ValidationError)) throw err
      const found: Record<string, string> = {}
      for (const e of err.inner.length ? err.inner : [err]) found[e.path || '_'] ??= e.message
      errors.value = found
      return null
    }
  }

  return { draft, dosedByTable, errors, load, addBand, removeBand, checked }
}
