import { describe, expect, it } from 'vitest'
import { neutralise, safeCsv } from '../../../server/services/reports/csvSafe'

// The characters a spreadsheet reads as the start of a formula (OWASP, CSV injection).
describe('neutralise', () => {
  it.each(['=1+1', '+SUM(A1)', '-2+3', '@cmd', '\tx', '\rx'])(
    'when a text cell starts like a formula (%j), then it gets a leading apostrophe',
    (v) => {
      expect(neutralise(v)).toBe(`'${v}`)
    },
  )
  it('when the cell is a number (even negative), then it is written as a number', () => expect(neutralise(-5)).toBe('-5'))
  it('when the cell is ordinary text or empty, then it is unchanged', () => {
    expect(neutralise('TKR')).toBe('TKR')
    expect(neutralise(null)).toBe('')
  })
  it('when a neutralised cell holds a comma, then it is also quoted', () => {
    expect(safeCsv(['a'], [{ a: '=HYPERLINK("x","y")' }])).toBe('a\r\n"\'=HYPERLINK(""x"",""y"")"\r\n')
  })
})
