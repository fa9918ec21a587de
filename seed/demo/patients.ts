import type { Priority, Stage } from '../../shared/pathway'

/**
 * Invented patients of the demo hospital. Names are made up (hedgerow and heathland words),
 * MRNs are "KV" + digits, e-mails end in @example.test. Days are relative to the day the demo
 * loads, so the worklist always looks current.
 *
 * hb: [days after referral, Hb g/L] — the first is the screening sample; ferritin/tsat/crp
 * come with it. `path` is the stage history after "referred"; its last stage is the current one.
 */
export interface DemoEpisode {
  given: string
  family: string
  sex: 'female' | 'male'
  age: number
  kg: number
  cm: number
  op: string
  surgeon: 'calder' | 'mensah' | 'whitlow'
  referredDaysAgo: number
  surgeryInDays: number
  priority?: Priority
  hb?: [number, number][]
  iron?: { ferritin: number; tsat: number; crp: number }
  path: Stage[]
  reason?: string
  /** Treating: the IV iron was ordered but not yet given. */
  notGiven?: boolean
  /** Re-check due this many days from today (negative: overdue). */
  recheckInDays?: number
}

const ID = { ferritin: 14, tsat: 9, crp: 3 }
const INFLAMED = { ferritin: 70, tsat: 14, crp: 22 }
const REPLETE = { ferritin: 160, tsat: 27, crp: 2 }

export const DEMO_EPISODES: DemoEpisode[] = [
  // Awaiting screening: four with no bloods yet (one with surgery close), two with bloods to confirm.
  { given: 'Ada', family: 'Larkspur', sex: 'female', age: 71, kg: 68, cm: 160, op: 'TKR', surgeon: 'calder', referredDaysAgo: 2, surgeryInDays: 44, path: [] },
  { given: 'Bram', family: 'Thistlewood', sex: 'male', age: 66, kg: 91, cm: 178, op: 'THR', surgeon: 'mensah', referredDaysAgo: 5, surgeryInDays: 51, path: [] },
  { given: 'Cora', family: 'Fenwhistle', sex: 'female', age: 58, kg: 74, cm: 165, op: 'TAH', surgeon: 'whitlow', referredDaysAgo: 9, surgeryInDays: 19, priority: 'urgent', path: [] },
  { given: 'Dorian', family: 'Heathcote', sex: 'male', age: 74, kg: 83, cm: 172, op: 'CABG', surgeon: 'calder', referredDaysAgo: 1, surgeryInDays: 38, path: [] },
  { given: 'Edith', family: 'Marrowby', sex: 'female', age: 63, kg: 59, cm: 158, op: 'OCOL', surgeon: 'mensah', referredDaysAgo: 6, surgeryInDays: 33, priority: 'cancer', hb: [[3, 112]], iron: ID, path: [] },
  { given: 'Felix', family: 'Bramblecote', sex: 'male', age: 69, kg: 88, cm: 181, op: 'TKR', surgeon: 'whitlow', referredDaysAgo: 7, surgeryInDays: 47, hb: [[4, 143]], iron: REPLETE, path: [] },
  // Screening to confirm.
  { given: 'Greta', family: 'Nettleford', sex: 'female', age: 77, kg: 63, cm: 155, op: 'THR', surgeon: 'calder', referredDaysAgo: 10, surgeryInDays: 36, hb: [[3, 124]], iron: INFLAMED, path: ['screened'] },
  { given: 'Hugo', family: 'Sorrelby', sex: 'male', age: 55, kg: 97, cm: 183, op: 'SPFM', surgeon: 'mensah', referredDaysAgo: 12, surgeryInDays: 40, hb: [[2, 138]], iron: REPLETE, path: ['screened'] },
  { given: 'Isla', family: 'Gorsedale', sex: 'female', age: 49, kg: 71, cm: 168, op: 'LIVR', surgeon: 'whitlow', referredDaysAgo: 8, surgeryInDays: 24, priority: 'cancer', hb: [[2, 117]], iron: ID, path: ['screened'] },
  { given: 'Jasper', family: 'Teaselwick', sex: 'male', age: 72, kg: 79, cm: 175, op: 'RCYS', surgeon: 'calder', referredDaysAgo: 11, surgeryInDays: 30, priority: 'cancer', hb: [[3, 131]], iron: { ferritin: 45, tsat: 17, crp: 9 }, path: ['screened'] },
  // For anaemia clinic: several with surgery inside four weeks and still anaemic.
  { given: 'Kit', family: 'Hawthornley', sex: 'female', age: 68, kg: 66, cm: 162, op: 'TKR', surgeon: 'calder', referredDaysAgo: 20, surgeryInDays: 14, hb: [[3, 108]], iron: ID, path: ['screened', 'clinic'] },
  { given: 'Leopold', family: 'Yarrowfield', sex: 'male', age: 79, kg: 72, cm: 170, op: 'CABG', surgeon: 'mensah', referredDaysAgo: 18, surgeryInDays: 21, hb: [[2, 114]], iron: INFLAMED, path: ['screened', 'clinic'] },
  { given: 'Mabel', family: 'Cloverhill', sex: 'female', age: 61, kg: 82, cm: 166, op: 'OCOL', surgeon: 'whitlow', referredDaysAgo: 16, surgeryInDays: 9, priority: 'cancer', hb: [[2, 97]], iron: ID, path: ['screened', 'clinic'] },
  { given: 'Nils', family: 'Brackenmoor', sex: 'male', age: 64, kg: 101, cm: 185, op: 'RTHR', surgeon: 'calder', referredDaysAgo: 15, surgeryInDays: 45, hb: [[3, 122]], iron: ID, path: ['screened', 'clinic'] },
  { given: 'Opal', family: 'Sedgewater', sex: 'female', age: 73, kg: 58, cm: 152, op: 'THR', surgeon: 'mensah', referredDaysAgo: 14, surgeryInDays: 52, hb: [[2, 126]], iron: INFLAMED, path: ['screened', 'clinic'] },
  { given: 'Piers', family: 'Furzebank', sex: 'male', age: 57, kg: 86, cm: 177, op: 'SPFM', surgeon: 'whitlow', referredDaysAgo: 13, surgeryInDays: 26, hb: [[3, 119]], iron: ID, path: ['screened', 'clinic'] },
  // Iron therapy under way: one not yet given, one re-check overdue, one whose Hb fell after iron
  // (Mallowcroft) and one with no response to IV iron by 4 weeks (Foxglover).
  { given: 'Quinn', family: 'Rushmere', sex: 'female', age: 66, kg: 70, cm: 164, op: 'TKR', surgeon: 'calder', referredDaysAgo: 30, surgeryInDays: 25, hb: [[3, 109]], iron: ID, path: ['screened', 'clinic', 'treating'], recheckInDays: 8 },
  { given: 'Rowan', family: 'Wychwood', sex: 'male', age: 70, kg: 77, cm: 174, op: 'RCYS', surgeon: 'mensah', referredDaysAgo: 24, surgeryInDays: 20, priority: 'cancer', hb: [[2, 104]], iron: ID, path: ['screened', 'clinic', 'treating'], notGiven: true },
  { given: 'Saffron', family: 'Eldergrove', sex: 'female', age: 54, kg: 64, cm: 169, op: 'TAH', surgeon: 'whitlow', referredDaysAgo: 45, surgeryInDays: 17, hb: [[3, 101]], iron: ID, path: ['screened', 'clinic', 'treating'], recheckInDays: -4 },
  { given: 'Tobias', family: 'Mallowcroft', sex: 'male', age: 75, kg: 84, cm: 171, op: 'CABG', surgeon: 'calder', referredDaysAgo: 28, surgeryInDays: 34, hb: [[3, 116], [26, 109]], iron: INFLAMED, path: ['screened', 'clinic', 'treating'], recheckInDays: 5 },
  { given: 'Ursula', family: 'Tansyford', sex: 'female', age: 62, kg: 93, cm: 167, op: 'LIVR', surgeon: 'mensah', referredDaysAgo: 26, surgeryInDays: 29, priority: 'cancer', hb: [[2, 111]], iron: ID, path: ['screened', 'clinic', 'treating'], recheckInDays: 2 },
  // Awaiting re-check bloods, some already back.
  { given: 'Victor', family: 'Hollowell', sex: 'male', age: 68, kg: 80, cm: 176, op: 'THR', surgeon: 'whitlow', referredDaysAgo: 42, surgeryInDays: 12, hb: [[3, 112], [38, 127]], iron: ID, path: ['screened', 'clinic', 'treating', 'recheck'], recheckInDays: -5 },
  { given: 'Wren', family: 'Foxglover', sex: 'female', age: 59, kg: 61, cm: 159, op: 'TKR', surgeon: 'calder', referredDaysAgo: 40, surgeryInDays: 18, hb: [[2, 106], [38, 109]], iron: ID, path: ['screened', 'clinic', 'treating', 'recheck'], recheckInDays: 1 },
  { given: 'Xavier', family: 'Burdock', sex: 'male', age: 81, kg: 69, cm: 168, op: 'OCOL', surgeon: 'mensah', referredDaysAgo: 39, surgeryInDays: 10, priority: 'cancer', hb: [[3, 103], [35, 118]], iron: ID, path: ['screened', 'clinic', 'treating', 'recheck'], recheckInDays: -6 },
  { given: 'Yara', family: 'Meadowsweet', sex: 'female', age: 67, kg: 75, cm: 163, op: 'SPFM', surgeon: 'whitlow', referredDaysAgo: 44, surgeryInDays: 23, hb: [[2, 115], [40, 133]], iron: ID, path: ['screened', 'clinic', 'treating', 'recheck'], recheckInDays: -5 },
  // Fit for theatre: straight from screening, or after treatment.
  { given: 'Zachary', family: 'Quickthorn', sex: 'male', age: 60, kg: 90, cm: 182, op: 'TKR', surgeon: 'mensah', referredDaysAgo: 21, surgeryInDays: 8, hb: [[2, 146]], iron: REPLETE, path: ['screened', 'cleared'] },
  { given: 'Amber', family: 'Lichfold', sex: 'female', age: 52, kg: 67, cm: 170, op: 'LCOL', surgeon: 'whitlow', referredDaysAgo: 19, surgeryInDays: 6, priority: 'cancer', hb: [[2, 134]], iron: REPLETE, path: ['screened', 'cleared'] },
  { given: 'Basil', family: 'Ferncastle', sex: 'male', age: 71, kg: 82, cm: 173, op: 'RTHR', surgeon: 'calder', referredDaysAgo: 60, surgeryInDays: 4, hb: [[3, 111], [40, 135]], iron: ID, path: ['screened', 'clinic', 'treating', 'recheck', 'cleared'] },
  { given: 'Clemency', family: 'Rowanby', sex: 'female', age: 65, kg: 72, cm: 161, op: 'THR', surgeon: 'mensah', referredDaysAgo: 55, surgeryInDays: 11, hb: [[2, 118], [38, 132]], iron: ID, path: ['screened', 'clinic', 'treating', 'recheck', 'cleared'] },
  { given: 'Digby', family: 'Hazelmere', sex: 'male', age: 58, kg: 95, cm: 180, op: 'CABG', surgeon: 'whitlow', referredDaysAgo: 25, surgeryInDays: 15, hb: [[2, 139]], iron: REPLETE, path: ['screened', 'cleared'] },
  // Surgery done, then closed after the post-operative check.
  { given: 'Elspeth', family: 'Knapweed', sex: 'female', age: 70, kg: 69, cm: 157, op: 'TKR', surgeon: 'calder', referredDaysAgo: 50, surgeryInDays: -2, hb: [[3, 136]], iron: REPLETE, path: ['screened', 'cleared', 'operated'] },
  { given: 'Fergus', family: 'Stonecrop', sex: 'male', age: 76, kg: 78, cm: 169, op: 'OCOL', surgeon: 'mensah', referredDaysAgo: 58, surgeryInDays: -5, priority: 'cancer', hb: [[2, 113], [36, 129]], iron: ID, path: ['screened', 'clinic', 'treating', 'recheck', 'cleared', 'operated'] },
  { given: 'Gwendolyn', family: 'Birchlow', sex: 'female', age: 63, kg: 84, cm: 166, op: 'TAH', surgeon: 'whitlow', referredDaysAgo: 47, surgeryInDays: -1, hb: [[2, 131]], iron: REPLETE, path: ['screened', 'cleared', 'operated'] },
  { given: 'Horace', family: 'Dewberry', sex: 'male', age: 67, kg: 88, cm: 175, op: 'THR', surgeon: 'calder', referredDaysAgo: 80, surgeryInDays: -20, hb: [[3, 141]], iron: REPLETE, path: ['screened', 'cleared', 'operated', 'closed'] },
  { given: 'Imogen', family: 'Sloeberry', sex: 'female', age: 56, kg: 62, cm: 163, op: 'LCOL', surgeon: 'mensah', referredDaysAgo: 75, surgeryInDays: -14, priority: 'cancer', hb: [[2, 119], [30, 131]], iron: ID, path: ['screened', 'clinic', 'treating', 'recheck', 'cleared', 'operated', 'closed'] },
  { given: 'Jethro', family: 'Mosswell', sex: 'male', age: 73, kg: 76, cm: 172, op: 'SPFM', surgeon: 'whitlow', referredDaysAgo: 90, surgeryInDays: -30, hb: [[2, 137]], iron: REPLETE, path: ['screened', 'cleared', 'operated', 'closed'] },
  // Surgery postponed.
  { given: 'Kezia', family: 'Harebell', sex: 'female', age: 78, kg: 55, cm: 150, op: 'RTHR', surgeon: 'calder', referredDaysAgo: 35, surgeryInDays: 70, hb: [[2, 92]], iron: { ferritin: 210, tsat: 31, crp: 3 }, path: ['screened', 'clinic', 'deferred'], reason: 'Hb 92 g/L without iron deficiency: referred to haematology; date to be reset after review' },
  { given: 'Lorcan', family: 'Whinmoor', sex: 'male', age: 69, kg: 110, cm: 179, op: 'TKR', surgeon: 'mensah', referredDaysAgo: 32, surgeryInDays: 84, hb: [[3, 107]], iron: ID, path: ['screened', 'clinic', 'deferred'], reason: 'Elective knee: postponed until anaemia corrected' },
  // Off the pathway.
  { given: 'Marisol', family: 'Quillmere', sex: 'female', age: 60, kg: 73, cm: 168, op: 'TAH', surgeon: 'whitlow', referredDaysAgo: 22, surgeryInDays: 16, hb: [[2, 128]], iron: REPLETE, path: ['screened', 'withdrawn'], reason: 'Patient chose non-surgical management' },
  { given: 'Neville', family: 'Ashgrove', sex: 'male', age: 82, kg: 70, cm: 166, op: 'CABG', surgeon: 'calder', referredDaysAgo: 17, surgeryInDays: 27, path: ['withdrawn'], reason: 'Operation cancelled by the cardiac team' },
]
