import type { PatientMatch } from './match'

/** Enough for a large file's distinct patients; about 10 MB of answers at most, so a run's memory stays flat. */
export const KNOWN_PATIENTS_MAX = 50_000

/**
 * The patient match's answers of one import run, by the MRN's text as the file wrote it: the
 * patient and newest open episode, or null for no patient. A laboratory file repeats a patient's
 * MRN on many rows (blood count, iron studies, CRP, renal), so each MRN is sent to the database
 * once per run instead of once per chunk.
 *
 * Why the answer cannot differ from asking again: the run holds one REPEATABLE READ transaction
 * (ImportRun.begin names the level rather than relying on the server's default), so every plain read of the run
 * sees the snapshot its first read took, and the run writes neither patients nor referrals
 * before the last chunk. A later chunk's findPatients would read the same rows and give the same
 * patient and episode, even if another session closes an episode meanwhile
 * (tests/api/imports-known-patients.test.ts). And an MRN's answer does not depend on the
 * chunk's other MRNs: the mrn column's collation (utf8mb4_unicode_ci) ignores case, so the MRN
 * itself matches the one patient whose MRN is the same in capitals, the key findPatients answers by.
 *
 * Bounded: when full it starts again empty (those MRNs are simply asked again), never more than
 * `max` answers held.
 */
export class KnownPatients {
  private readonly answers = new Map<string, PatientMatch | null>()

  constructor(private readonly max = KNOWN_PATIENTS_MAX) {}

  get size(): number {
    return this.answers.size
  }

  /** The MRNs of these that have no answer yet (the ones to send to findPatients). */
  unknown(mrns: Iterable<string>): string[] {
    const out: string[] = []
    for (const m of mrns) if (!this.answers.has(m)) out.push(m)
    return out
  }

  /** The answer held for an MRN; undefined when it was never asked (or the answers were started again). */
  get(mrn: string): PatientMatch | null | undefined {
    return this.answers.get(mrn)
  }

  /** findPatients' answer for `asked` (keyed by MRN in capitals, as it answers), each MRN's patient or null. */
  remember(asked: readonly string[], found: ReadonlyMap<string, PatientMatch>): void {
    if (this.answers.size + asked.length > this.max) this.answers.clear()
    for (const m of asked.slice(0, this.max)) this.answers.set(m, found.get(m.toUpperCase()) ?? null)
  }
}
