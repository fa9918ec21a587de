import type { AnaemiaCriteria } from '../clinical'

/** The clinic's thresholds. Admin-editable; every figure that uses one names it. */
export interface ClinicSettings {
  /** Anaemia criteria for screening: 'surgical' is <130 g/L in both sexes (Muñoz et al., Anaesthesia 2017). */
  anaemiaCriteria: AnaemiaCriteria
  /** Restrictive red-cell transfusion trigger (NICE NG24, 2015: 70 g/L). */
  transfusionTriggerGL: number
  /** Trigger for patients with cardiovascular disease (AABB 2023, Carson, JAMA: 8 g/dL). */
  cardiovascularTriggerGL: number
  /** Target Hb for the Ganzoni deficit (iron sucrose labels use 15 g/dL for ≥35 kg). */
  ironTargetHbGL: number
  /** Days after the last dose when the re-check Hb is due: 4 weeks (Ferinject SmPC 4.2: Hb re-assessed no earlier than 4 weeks after
   * the last dose). */
  recheckDaysAfterLastDose: number
  /** Stated defaults for arterial oxygen when no blood gas is recorded (common practice, room air). */
  defaultSaO2: number
  defaultPaO2MmHg: number
  /** Resting cardiac index used to default cardiac output from body surface area (common practice ≈ 3.0). */
  defaultCardiacIndexLMinM2: number
  /** Weight older than this warns at prescription. */
  weightMaxAgeDays: number
  /**
   * An Hb older than this no longer counts as evidence for the readiness verdict (default 90
   * days, local policy; the Australian NBA PBM pre-operative template asks for results no older
   * than 3 months, secondary source only).
   */
  resultMaxAgeDays: number
  /**
   * Ferritin, TSAT or CRP older than this no longer settles the iron status for the verdict
   * (default 90 days, local policy, on the same basis as resultMaxAgeDays).
   */
  ironStudiesMaxAgeDays: number
}

export const DEFAULT_CLINIC_SETTINGS: ClinicSettings = {
  anaemiaCriteria: 'surgical',
  transfusionTriggerGL: 70,
  cardiovascularTriggerGL: 80,
  ironTargetHbGL: 150,
  recheckDaysAfterLastDose: 28,
  defaultSaO2: 0.97,
  defaultPaO2MmHg: 95,
  defaultCardiacIndexLMinM2: 3.0,
  weightMaxAgeDays: 90,
  resultMaxAgeDays: 90,
  ironStudiesMaxAgeDays: 90,
}

export const TRIGGER_SOURCES = {
  standard: 'NICE NG24 (2015): restrictive threshold 70 g/L',
  cardiovascular: 'AABB 2023 (Carson et al., JAMA): 80 g/L with cardiovascular disease; NICE NG24: 80 g/L in acute coronary syndrome',
} as const
