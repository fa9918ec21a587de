/**
 * One closing line for `npm run bench`: each target of issues #17 and #19 with the figure this run
 * measured and whether it was met, so that "every target met in one run" can be read off one line.
 * Parts not run are left out (a part run alone gives a partial summary, marked `complete: false`).
 */
import os from 'node:os'

interface Parts {
  bundle?: { fetchedWithinBudget?: boolean; signInFetchedJsGzipKB?: number }
  worklist?: { rpsRatio?: number; p95Ratio?: number; serverMemory?: { peakMb?: number }; issue19?: { met?: Record<string, boolean> } }
  reports?: { timings?: Record<string, { medianMs: number }>; issue19?: { met?: boolean } }
  imports?: {
    issue19?: { met?: Record<string, boolean> }
    runs?: { rows: number; previewMs: number; commitMs: number; reverseMs: number }[]
  }
  hl7?: { perSecond?: number; exactlyOnce?: boolean; met?: boolean }
  polls?: { doctorHome?: { requestsPerMinByPath?: Record<string, number> }; episode?: { requestsPerMinByPath?: Record<string, number> } }
}

const POLL_S = 8 // the worklist and episode polls' interval (src/features/episode/composables)

export function benchSummary(p: Parts) {
  const figures: Record<string, { value: unknown; met: boolean }> = {}
  if (p.bundle) figures.signInFetchedJsGzipKB = { value: p.bundle.signInFetchedJsGzipKB, met: !!p.bundle.fetchedWithinBudget }
  if (p.worklist) {
    const met = p.worklist.issue19?.met ?? {}
    figures.worklistRpsRatio = { value: p.worklist.rpsRatio, met: !!met.rpsRatio }
    figures.worklistP95Ratio = { value: p.worklist.p95Ratio, met: !!met.p95Ratio }
    figures.serverPeakMb = { value: p.worklist.serverMemory?.peakMb, met: !!met.peakMb }
  }
  if (p.reports) {
    const medians = Object.fromEntries(Object.entries(p.reports.timings ?? {}).map(([k, v]) => [k, v.medianMs]))
    figures.reportMediansMs = { value: medians, met: !!p.reports.issue19?.met }
  }
  if (p.imports) {
    const met = p.imports.issue19?.met ?? {}
    const run = (rows: number) => p.imports?.runs?.find((r) => r.rows === rows)
    figures.import100kPreviewMs = { value: run(100_000)?.previewMs, met: !!met.preview }
    figures.import100kCommitMs = { value: run(100_000)?.commitMs, met: !!met.commit }
    figures.import25kReverseMs = { value: run(25_000)?.reverseMs, met: !!met.reverse }
  }
  if (p.polls) {
    // The count tiles of the doctor's home: one request per poll (issue 19 point 3).
    const counts = p.polls.doctorHome?.requestsPerMinByPath?.['/api/worklist/counts'] ?? 0
    const perPoll = +((counts * POLL_S) / 60).toFixed(2)
    figures.doctorHomeCountRequestsPerPoll = { value: perPoll, met: perPoll > 0 && perPoll <= 1.1 }
  }
  const issue19 = Object.values(figures)
  const complete = !!(p.bundle && p.worklist && p.reports && p.imports && p.polls)
  return {
    bench: 'summary',
    issue17: p.hl7 ? { perSecond: p.hl7.perSecond, exactlyOnce: p.hl7.exactlyOnce, met: !!p.hl7.met } : undefined,
    issue19: { figures, allMet: complete && issue19.every((f) => f.met), complete },
    loadAverage1m: Math.round(os.loadavg()[0]! * 10) / 10,
  }
}
