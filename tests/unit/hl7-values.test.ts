import { describe, expect, it } from 'vitest'
import { obxAction, readHl7Date, readHl7Timestamp, readObxValue } from '../../shared/hl7'
import { messagesFromText } from '../../scripts/lib/hl7Client'

describe('OBX-5 values', () => {
  it('when a plain number is sent, then it is that number with no comparator', () => {
    expect(readObxValue('NM', '104', '')).toEqual({ value: 104, comparator: null })
    expect(readObxValue('NM', ' 9.8 ', '')).toEqual({ value: 9.8, comparator: null })
  })
  it('when a limit is sent as text or as SN (structured numeric, comparator^number), then the comparator is kept', () => {
    expect(readObxValue('NM', '<5', '')).toEqual({ value: 5, comparator: '<' })
    expect(readObxValue('ST', '>= 1500', '')).toEqual({ value: 1500, comparator: '>=' })
    expect(readObxValue('SN', '<', '5')).toEqual({ value: 5, comparator: '<' })
    expect(readObxValue('SN', '', '12.5')).toEqual({ value: 12.5, comparator: null })
  })
  it('when the value is text, a range or empty, then it is not a result Ferrolane holds', () => {
    expect(readObxValue('ST', 'haemolysed', '')).toBeNull()
    expect(readObxValue('NM', '', '')).toBeNull()
    expect(readObxValue('SN', '', '10')).toEqual({ value: 10, comparator: null })
    expect(readObxValue('SN', '~', '10')).toBeNull()
  })
})

describe('HL7 timestamps', () => {
  it('when an offset is given, then it is honoured', () => {
    expect(readHl7Timestamp('20260131093000+0100', 'Europe/London')!.toISOString()).toBe('2026-01-31T08:30:00.000Z')
    expect(readHl7Timestamp('202601310930-0500', 'Europe/London')!.toISOString()).toBe('2026-01-31T14:30:00.000Z')
  })
  it("when no offset is given, then it is the clinic's wall-clock time (London is UTC+1 in July)", () => {
    expect(readHl7Timestamp('20260715093000', 'Europe/London')!.toISOString()).toBe('2026-07-15T08:30:00.000Z')
  })
  it('when only a date, or an impossible time, is given, then it is refused', () => {
    expect(readHl7Timestamp('20260131', 'Europe/London')).toBeNull()
    expect(readHl7Timestamp('20260231093000', 'Europe/London')).toBeNull()
    expect(readHl7Timestamp('20260131250000', 'Europe/London')).toBeNull()
  })
  it('when a date of birth is read, then the date part counts and impossible dates are refused', () => {
    expect(readHl7Date('19600412')).toBe('1960-04-12')
    expect(readHl7Date('196004120830')).toBe('1960-04-12')
    expect(readHl7Date('19600231')).toBeNull()
  })
})

describe('OBX-11 result status (HL7 v2 table 0085, from memory)', () => {
  it('then F, C and P are kept as final, corrected and preliminary, X and D void, anything else is refused', () => {
    expect(['F', 'C', 'P', 'X', 'D', 'c'].map(obxAction)).toEqual(['final', 'corrected', 'preliminary', 'void', 'void', 'corrected'])
    expect(obxAction('R')).toBeNull()
    expect(obxAction('')).toBeNull()
  })
})

describe('.hl7 files for hl7:send', () => {
  it('when a file holds two messages with LF or CRLF line ends, then each MSH starts a message whose segments end in CR', () => {
    const text = 'MSH|^~\\&|A\r\nPID|1\r\n\r\nMSH|^~\\&|B\nPID|2\n'
    expect(messagesFromText(text)).toEqual(['MSH|^~\\&|A\rPID|1', 'MSH|^~\\&|B\rPID|2'])
  })
})
