import { describe, expect, it } from 'vitest'
import { auditDiff } from '../../../src/display/audit'
import { cellText, chartFor, columnsOf, definitionsOf } from '../../../src/display/reports'

describe('the audit entry before/after, field by field', () => {
  it('when a move changes the stage, then the changed fields are marked and the unchanged one is kept as "same"', () => {
    const lines = auditDiff({ stage: 'operated', version: 3, priority: 'routine' }, { stage: 'closed', version: 4, priority: 'routine' })
    expect(lines).toEqual([
      { field: 'stage', before: 'operated', after: 'closed', changed: true },
      { field: 'version', before: '3', after: '4', changed: true },
      { field: 'priority', before: 'routine', after: 'routine', changed: false },
    ])
  })

  it('when a record is created, then "before" is empty and nested values read as JSON', () => {
    expect(auditDiff(null, { complications: ['none'], dischargeHbGL: null })).toEqual([
      { field: 'complications', before: '', after: '["none"]', changed: true },
      { field: 'dischargeHbGL', before: '', after: '—', changed: true },
    ])
  })
})

describe('report tables on screen', () => {
  const funnel = {
    columns: [
      { key: 'step', label: 'Step' },
      { key: 'label', label: 'Label' },
      { key: 'count', label: 'Episodes' },
    ],
    rows: [{ step: 'referred', label: 'Referred', count: 4 }],
    definitions: { referred: { numerator: 'Episodes referred', denominator: 'Episodes referred', period: 'p' } },
  }
  it('when the row names its figure, then the key column is hidden and the definition is titled by the row label', () => {
    expect(columnsOf(funnel).map((c) => c.key)).toEqual(['label', 'count'])
    expect(definitionsOf(funnel)).toEqual([{ figure: 'Referred', d: funnel.definitions.referred }])
  })
  it('when a value is missing, boolean or an API code, then it reads as a word', () => {
    expect(cellText('ctRatio', null)).toBe('—')
    expect(cellText('treated', true)).toBe('Yes')
    expect(cellText('suggestion', 'fewer-units')).toBe('Crossmatch fewer units')
  })
  it('then only the funnel, the Hb distribution and the waiting times are drawn', () => {
    expect([
      chartFor('funnel', 'funnel'),
      chartFor('haemoglobin', 'distribution'),
      chartFor('haemoglobin', 'riseByProduct'),
      chartFor('waiting-times', 'waitingTimes'),
      chartFor('blood-ordering', 'bloodOrdering'),
    ]).toEqual(['funnel', 'distribution', null, 'waiting', null])
  })
})
