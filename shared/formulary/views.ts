import type { IronDosingTable, IronProduct } from '../clinical'

/**
 * One formulary product as the API answers it. `dosingTable` here is the table on file, which
 * plans use only when `dosedByTable` is set; the clinical library's IronProduct (used for plans)
 * carries the table only then.
 */
export interface FormularyEntry extends Omit<IronProduct, 'dosingTable'> {
  id: number
  source: string
  active: boolean
  caution: string
  dosingTable: IronDosingTable | null
  dosedByTable: boolean
}
