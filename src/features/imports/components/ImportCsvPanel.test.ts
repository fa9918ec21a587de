// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import { answerFetch, mountInApp } from '@/testing/component'
import type { MappingView } from '@shared/imports/views'
import ImportCsvPanel from './ImportCsvPanel.vue'

afterEach(() => vi.unstubAllGlobals())

// An invented laboratory's saved mapping: its own headers, day-first dates and one local code.
const SAVED: MappingView = {
  sourceName: 'Hospital laboratory',
  mapping: {
    columns: { mrn: 'Hosp No', code: 'Test', value: 'Result', unit: 'Units', takenAt: 'Collected' },
    delimiter: ';',
    dateOrder: 'dmy',
    codes: { FERR2: 'ferritin' },
  },
  saved: true,
  updatedAt: '2026-11-30T09:00:00.000Z',
}

describe('the laboratory CSV panel', () => {
  it("when the source has a saved mapping, then the panel loads that source's headers, not the defaults", async () => {
    answerFetch({ 'GET /imports/mappings/Hospital%20laboratory': { status: 200, body: SAVED } })
    const wrapper = mountInApp(ImportCsvPanel, { props: { canSaveMapping: true }, attachTo: document.body })
    await flushPromises()
    await vi.waitFor(() => expect((wrapper.get('#map-mrn').element as HTMLInputElement).value).toBe('Hosp No'))
    expect((wrapper.get('#map-takenAt').element as HTMLInputElement).value).toBe('Collected')
    wrapper.unmount()
  })
})
