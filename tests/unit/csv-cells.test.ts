import { describe, expect, it } from 'vitest'
import { csvField, toCsv } from '../../shared/csv'

// OWASP "CSV Injection": cells beginning with = + - @, a tab or a carriage return are read as formulas.
describe('CSV cells', () => {
  it('when text begins with = + - @, a tab or a carriage return, then it gets a leading apostrophe', () => {
    expect(csvField('=HYPERLINK("http://x.test","click")')).toBe(`"'=HYPERLINK(""http://x.test"",""click"")"`)
    expect(csvField('+1+1')).toBe("'+1+1")
    expect(csvField('-2+3')).toBe("'-2+3")
    expect(csvField('@SUM(A1)')).toBe("'@SUM(A1)")
    expect(csvField('\tcmd')).toBe("'\tcmd")
    expect(csvField('\rcmd')).toBe(`"'\rcmd"`)
  })

  it('then numbers stay numbers, negative ones too, and ordinary text is untouched', () => {
    expect(csvField(-4.5)).toBe('-4.5')
    expect(csvField(0)).toBe('0')
    expect(csvField('Total knee replacement')).toBe('Total knee replacement')
    expect(csvField('a, b')).toBe('"a, b"')
    expect(csvField(null)).toBe('')
    expect(csvField({ a: 1 })).toBe('"{""a"":1}"')
  })

  it('then a whole table has its header and every row neutralised', () => {
    expect(toCsv(['name', 'n'], [{ name: '=1+1', n: -1 }])).toBe("name,n\r\n'=1+1,-1\r\n")
  })
})
