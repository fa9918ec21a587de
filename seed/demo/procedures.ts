import type { BloodOrder } from '../../shared/pathway'

export interface DemoProcedure {
  code: string
  name: string
  specialty: string
  expectedBloodLossMl: number | null
  transfusionRate: number | null
  usualBloodOrder: BloodOrder
  usualUnits: number
  source: string
}

/**
 * The demo operations catalogue. Blood-loss figures are those of the clinical reference §9
 * with its own tags carried into `source`; where the reference gives a range from memory the
 * midpoint is used and says so. The reference gives no transfusion rates: every rate here is a
 * demo placeholder, "set locally", for the service to replace from its own audit.
 */
export const DEMO_PROCEDURES: DemoProcedure[] = [
  {
    code: 'TKR',
    name: 'Total knee replacement',
    specialty: 'Orthopaedics',
    expectedBloodLossMl: 1474,
    transfusionRate: 0.08,
    usualBloodOrder: 'group-and-screen',
    usualUnits: 0,
    source: 'Loss: Sehat, Knee 2000 (total incl. hidden). Order: group and screen (old sample schedule). Rate: set locally',
  },
  {
    code: 'THR',
    name: 'Total hip replacement',
    specialty: 'Orthopaedics',
    expectedBloodLossMl: 1510,
    transfusionRate: 0.1,
    usualBloodOrder: 'group-and-screen',
    usualUnits: 0,
    source: 'Loss: Sehat 2004 (secondary summary; confirm). Order and rate: set locally',
  },
  {
    code: 'RTHR',
    name: 'Revision hip replacement',
    specialty: 'Orthopaedics',
    expectedBloodLossMl: 2000,
    transfusionRate: 0.35,
    usualBloodOrder: 'crossmatch',
    usualUnits: 2,
    source: 'Local policy (invented demo figure; set from your own audit)',
  },
  {
    code: 'OCOL',
    name: 'Open colorectal resection',
    specialty: 'Colorectal surgery',
    expectedBloodLossMl: 350,
    transfusionRate: 0.15,
    usualBloodOrder: 'group-and-screen',
    usualUnits: 0,
    source: 'Loss: midpoint of 200–500 mL, local policy (demo figure). Order and rate: set locally',
  },
  {
    code: 'LCOL',
    name: 'Laparoscopic colorectal resection',
    specialty: 'Colorectal surgery',
    expectedBloodLossMl: 150,
    transfusionRate: 0.05,
    usualBloodOrder: 'group-and-screen',
    usualUnits: 0,
    source: 'Local policy (invented demo figure; set from your own audit)',
  },
  {
    code: 'TAH',
    name: 'Total abdominal hysterectomy',
    specialty: 'Gynaecology',
    expectedBloodLossMl: 375,
    transfusionRate: 0.05,
    usualBloodOrder: 'crossmatch',
    usualUnits: 2,
    source: 'Loss: midpoint of 250–500 mL, local policy (demo figure). Order: 2 units (old sample schedule). Rate: set locally',
  },
  {
    code: 'CABG',
    name: 'Coronary artery bypass graft (on-pump)',
    specialty: 'Cardiac surgery',
    expectedBloodLossMl: 750,
    transfusionRate: 0.4,
    usualBloodOrder: 'crossmatch',
    usualUnits: 2,
    source: 'Loss: midpoint of 500–1000 mL by 24 h, local policy (demo figure). Order: 2 units (old sample schedule). Rate: set locally',
  },
  {
    code: 'SPFM',
    name: 'Multilevel spinal fusion',
    specialty: 'Spinal surgery',
    expectedBloodLossMl: 2000,
    transfusionRate: 0.3,
    usualBloodOrder: 'crossmatch',
    usualUnits: 2,
    source: 'Loss: 1000–3000+ mL, local policy (demo figure); 2000 set locally. Order and rate: set locally',
  },
  {
    code: 'RCYS',
    name: 'Radical cystectomy',
    specialty: 'Urology',
    expectedBloodLossMl: 1500,
    transfusionRate: 0.3,
    usualBloodOrder: 'crossmatch',
    usualUnits: 2,
    source: 'Local policy (invented demo figure; set from your own audit)',
  },
  {
    code: 'LIVR',
    name: 'Liver resection',
    specialty: 'Hepatobiliary surgery',
    expectedBloodLossMl: 1000,
    transfusionRate: 0.2,
    usualBloodOrder: 'crossmatch',
    usualUnits: 2,
    source: 'Local policy (invented demo figure; set from your own audit)',
  },
]
