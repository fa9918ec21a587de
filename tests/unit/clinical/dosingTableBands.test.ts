import { describe, expect, it } from 'vitest'
import { dosingTableProblems, draftToTable, tableNeedMg, tableToDraft, type DosingTableDraft } from '../../../shared/clinical'

// Ferinject (ferric carboxymaltose) SmPC 4.2, Table 1 "Determination of the iron need" (MHRA,
// revision 2021, as reproduced at rxreasoner.com/monographs/ferinject/usage): Hb <10 / 10 to <14 /
// ≥14 g/dL against body weight below 35 kg / 35 to <70 kg / 70 kg and above.
const SMPC: DosingTableDraft = {
  weightBands: [
    { from: 0, below: 35 },
    { from: 35, below: 70 },
    { from: 70, below: null },
  ],
  hbBands: [
    { from: 0, below: 100 },
    { from: 100, below: 140 },
    { from: 140, below: null },
  ],
  needMg: [
    [500, 1500, 2000],
    [500, 1000, 1500],
    [500, 500, 500],
  ],
  source: 'Ferinject SmPC 4.2, Table 1 (MHRA 2021)',
}

describe('the dosing table as an admin edits it', () => {
  it(
    'when the SmPC table is entered band by band, then it has no problems and reads back the label figures (Ferinject SmPC 4.2 ' +
      'Table 1: 34 kg → 500 mg; 69 kg, Hb 99 g/L → 1500 mg; 70 kg, Hb 100 g/L → 1500 mg; Hb 140 g/L → 500 mg)',
    () => {
      expect(dosingTableProblems(SMPC)).toEqual([])
      const table = draftToTable(SMPC)
      expect(tableNeedMg(table, 34, 80)).toBe(500)
      expect(tableNeedMg(table, 69, 99)).toBe(1500)
      expect(tableNeedMg(table, 70, 100)).toBe(1500)
      expect(tableNeedMg(table, 90, 140)).toBe(500)
      expect(tableToDraft(table)).toEqual(SMPC)
    },
  )

  it('when weight bands leave a gap, then the band after the gap is named with both borders', () => {
    const problems = dosingTableProblems({
      ...SMPC,
      weightBands: [
        { from: 0, below: 35 },
        { from: 40, below: 70 },
        { from: 70, below: null },
      ],
    })
    expect(problems).toEqual([
      { path: 'table.weightBands[1].from', message: 'Weight band 2: starts at 40 kg but band 1 ends below 35 kg, a gap from 35 to 40 kg' },
    ])
  })

  it('when Hb bands overlap, then the overlapping band is named', () => {
    const problems = dosingTableProblems({
      ...SMPC,
      hbBands: [
        { from: 0, below: 100 },
        { from: 95, below: 140 },
        { from: 140, below: null },
      ],
    })
    expect(problems.map((p) => p.path)).toEqual(['table.hbBands[1].from'])
    expect(problems[0]!.message).toMatch(/overlap/)
  })

  it('when a cell is not a whole positive number of mg, then the message names its Hb and weight bands', () => {
    const problems = dosingTableProblems({
      ...SMPC,
      needMg: [
        [500, 1500, 2000],
        [500, 1000.5, 1500],
        [500, 500, -1],
      ],
    })
    expect(problems.map((p) => p.path)).toEqual(['table.needMg[1][1]', 'table.needMg[2][2]'])
    expect(problems[0]!.message).toBe('Hb 100 to <140 g/L × weight 35 to <70 kg: the need must be a whole number from 1 to 20000 mg')
    expect(problems[1]!.message).toMatch(/^Hb ≥140 g\/L × weight ≥70 kg/)
  })

  it('when a weight border is beyond any patient, then the band is refused', () => {
    const problems = dosingTableProblems({
      ...SMPC,
      weightBands: [
        { from: 0, below: 35 },
        { from: 35, below: 7000 },
        { from: 7000, below: null },
      ],
    })
    expect(problems[0]).toEqual({
      path: 'table.weightBands[1].below',
      message: 'Weight band 2: give an upper bound up to 350 kg (only the last band is open)',
    })
  })
})
