import { createHash } from 'node:crypto'
import type { Sequelize } from 'sequelize'
import { checkFhirBundle, type Checked, type FhirEntryResult, type FhirImportResult } from '../../../shared/imports'
import { Invalid, RuleRefused } from '../../errors'
import { LIMITS } from '../../../shared/limits'
import type { Viewer } from '../viewer'
import { ImportRun } from './run'

/**
 * A FHIR R4 Bundle of Observations, entry by entry. An invalid entry stops the whole bundle
 * from being stored unless the caller asked to store the valid entries (storeValid); either
 * way every entry's outcome is reported.
 */
export async function importFhirBundle(
  sequelize: Sequelize,
  viewer: Viewer,
  bundle: unknown,
  opts: { commit: boolean; storeValid: boolean; sourceName: string },
): Promise<FhirImportResult> {
  const entryCount = (bundle as { entry?: unknown } | null)?.entry
  if (Array.isArray(entryCount) && entryCount.length > LIMITS.fhirEntries) {
    throw new Invalid(
      `The Bundle has ${entryCount.length} entries, more than the limit of ${LIMITS.fhirEntries} for one upload; nothing was ` +
        `imported. Send it in parts.`,
      { bundle: `must have at most ${LIMITS.fhirEntries} entries` },
    )
  }
  const checked = checkFhirBundle(bundle, Date.now())
  if ('error' in checked) throw new RuleRefused(`${checked.error}. Nothing was imported.`, 'fhir_not_bundle', { bundle: checked.error })
  const invalid = checked.entries.filter((e) => e.kind === 'invalid').length
  const blocked = invalid > 0 && !opts.storeValid
  const items = checked.entries.flatMap((e): { row: number; checked: Checked }[] =>
    e.kind === 'reading' ? [{ row: e.index, checked: { ok: true, reading: e.reading } }] : [],
  )
  const sha256 = createHash('sha256').update(JSON.stringify(bundle)).digest('hex')
  const id = bundle as { id?: unknown }
  const run = new ImportRun(sequelize, viewer, {
    kind: 'fhir',
    commit: opts.commit && !blocked,
    sourceName: opts.sourceName,
    fileName: typeof id.id === 'string' ? `Bundle/${id.id}` : 'FHIR bundle',
  })
  const outcomes = new Map<number, FhirEntryResult>()
  try {
    await run.begin()
    for (let i = 0; i < items.length; i += 1000) {
      const out = await run.addChunk(items.slice(i, i + 1000))
      for (const a of out.accepted) outcomes.set(a.row, { index: a.row, outcome: 'accepted' })
      for (const s of out.skipped) outcomes.set(s.row, { index: s.row, outcome: 'skipped', reason: s.reason })
    }
    const summary = await run.finish(sha256)
    const entries = checked.entries.map((e): FhirEntryResult => {
      const base = { index: e.index, ...(e.fullUrl ? { fullUrl: e.fullUrl } : {}) }
      if (e.kind === 'invalid') return { ...base, outcome: 'invalid', reason: e.reason }
      if (e.kind === 'skip') return { ...base, outcome: 'skipped', reason: e.reason }
      return { ...outcomes.get(e.index)!, ...base }
    })
    return {
      ...(summary.batchId ? { batchId: summary.batchId } : {}),
      committed: summary.committed,
      entries,
      accepted: summary.accepted,
      skipped: entries.filter((e) => e.outcome === 'skipped').length,
      invalid,
      referralsAffected: summary.referralsAffected,
      sameFileAs: summary.sameFileAs,
      ...(opts.commit && blocked
        ? {
            notStored:
              `${invalid} entr${invalid === 1 ? 'y is' : 'ies are'} invalid, so nothing was stored; store the valid entries only ` +
              `if you mean to`,
          }
        : {}),
    }
  } catch (err) {
    await run.abandon()
    throw err
  }
}
