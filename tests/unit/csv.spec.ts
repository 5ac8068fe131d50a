import Papa from 'papaparse'
import { describe, expect, it } from 'vitest'
import { csvSafeCell, toSafeCsv } from '../../server/services/csv'

describe('spreadsheet-safe CSV cells', () => {
  it.each([
    ['=HYPERLINK("http://x.test","click")', `'=HYPERLINK("http://x.test","click")`],
    ['+1+2', `'+1+2`],
    ['-2+3', `'-2+3`],
    ['@SUM(A1:A2)', `'@SUM(A1:A2)`],
    ['\t=1', `'\t=1`],
    ['\r=1', `'\r'=1`],
    ['\r\n-1', `'\r\n'-1`],
    ['\n+1', `\n'+1`],
    // a cell that spans lines: every line start is checked
    ['Ana\n=cmd|calc', `Ana\n'=cmd|calc`],
    ['Ana\r\n+1', `Ana\r\n'+1`],
    ['Ana\r@x', `Ana\r'@x`],
    ['a\n-1\n=2', `a\n'-1\n'=2`],
    // harmless text is left alone
    ['Ana Lima', 'Ana Lima'],
    ['Ana-Lima = fine', 'Ana-Lima = fine'],
    ['mail@x.test', 'mail@x.test'],
    ['', ''],
  ])('%j → %j', (input, want) => {
    expect(csvSafeCell(input)).toBe(want)
  })

  it.each([[-70.5], [0], [42], [null], [true]])('leaves the non-text value %j as it is', (v) => {
    expect(csvSafeCell(v)).toBe(v)
  })

  it('a whole export keeps the text readable and numbers numeric', () => {
    const csv = toSafeCsv([{ name: '=1+1', lon: -70.5, notes: 'ok\n@x' }])
    const back = Papa.parse<string[]>(csv).data
    expect(back[0]).toEqual(['name', 'lon', 'notes'])
    expect(back[1]).toEqual([`'=1+1`, '-70.5', `ok\n'@x`])
  })
})
