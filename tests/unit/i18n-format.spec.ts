import { describe, expect, it } from 'vitest'
import { formatterFor } from '../../shared/i18n/format'

// Expected strings are CLDR's patterns as Node's ICU writes them; U+00A0 and U+202F are the no-break
// spaces CLDR puts between a number and its currency or percent sign.
const NBSP = '\u00a0'
const NNBSP = '\u202f'

describe('formats per locale', () => {
  it.each([
    ['en', '2 August 2027', '02/08/2027'],
    ['de', '2. August 2027', '02.08.2027'],
    ['es', '2 de agosto de 2027', '02/08/2027'],
    ['fr', '2 août 2027', '02/08/2027'],
  ])('%s dates', (code, long, short) => {
    const f = formatterFor(code)
    expect(f.date('2027-08-02T09:26:40Z')).toBe(long)
    expect(f.shortDate('2027-08-02T09:26:40Z')).toBe(short)
  })

  it('a date is the calendar day at the zone asked for, UTC by default', () => {
    const f = formatterFor('de')
    expect(f.date('2027-08-01T23:30:00Z')).toBe('1. August 2027')
    expect(f.date('2027-08-01T23:30:00Z', 'Europe/Berlin')).toBe('2. August 2027')
  })

  it.each([
    ['en', `€1,234.50`, `¥120,000`.replace('¥', 'JP¥'), `KWD${NBSP}1.250`],
    ['de', `1.234,50${NBSP}€`, `120.000${NBSP}¥`, `1,250${NBSP}KWD`],
    ['es', `1234,50${NBSP}€`, `120.000${NBSP}JPY`, `1,250${NBSP}KWD`],
    ['fr', `1${NNBSP}234,50${NBSP}€`, `120${NNBSP}000${NBSP}JPY`, `1,250${NBSP}KWD`],
  ])('%s money from minor units keeps each currency\'s ISO 4217 decimals', (code, eur, jpy, kwd) => {
    const f = formatterFor(code)
    expect(f.money(123450, 'EUR')).toBe(eur)
    expect(f.money(120000, 'JPY')).toBe(jpy)
    expect(f.money(1250, 'KWD')).toBe(kwd)
  })

  it.each(['en', 'de', 'es', 'fr'])('%s: clock times carry their zone label, and UTC stays "UTC"', (code) => {
    const f = formatterFor(code)
    expect(f.clock('2027-08-02T09:26:40Z')).toBe('09:26:40 UTC')
    expect(f.clock('2027-08-02T09:26:40Z', 'Africa/Cairo')).toBe('12:26:40 UTC+03:00')
    expect(f.clock('2027-01-02T09:26:40Z', 'Europe/London')).toBe('09:26:40 UTC±00:00')
    expect(f.clock('2027-08-02T09:26:40Z', 'Africa/Cairo', { label: false })).toBe('12:26:40')
    expect(f.zoneLabel('2027-08-02T09:26:40Z', 'America/Mexico_City')).toBe('UTC-06:00')
  })

  it('local and UTC forms come from one rounding (half up to the second, or to the minute)', () => {
    const f = formatterFor('fr')
    // 40.5 s rounds up once; both forms show :41.
    expect(f.clock('2027-08-02T09:26:40.500Z')).toBe('09:26:41 UTC')
    expect(f.clock('2027-08-02T09:26:40.500Z', 'Europe/Madrid')).toBe('11:26:41 UTC+02:00')
    // To the minute: 09:26:29.5 rounds to 09:27 (the second rounds to :30 first, then half up).
    expect(f.clock('2027-08-02T09:26:29.500Z', 'UTC', { seconds: false })).toBe('09:27 UTC')
    expect(f.clock('2027-08-02T09:26:29.400Z', 'UTC', { seconds: false })).toBe('09:26 UTC')
    expect(f.dateTime('2027-08-02T21:59:59.600Z', 'Europe/Madrid')).toBe('3 août 2027, 00:00 UTC+02:00')
  })

  it.each([
    ['en', 151, '2 mins 31 secs', '1 hr 2 mins 5 secs'],
    ['de', 151, '2 Min., 31 Sek.', '1 Std., 2 Min. und 5 Sek.'],
    ['es', 151, '2 min 31 s', '1 h 2 min 5 s'],
    ['fr', 151, `2${NBSP}min 31${NNBSP}s`, `1${NNBSP}h 2${NBSP}min 5${NNBSP}s`],
  ])('%s durations', (code, sec, short, long) => {
    const f = formatterFor(code)
    expect(f.duration(sec)).toBe(short)
    expect(f.duration(3725)).toBe(long)
  })

  it('durations round half up once and drop empty parts', () => {
    const f = formatterFor('es')
    expect(f.duration(59.5)).toBe('1 min')
    expect(f.duration(0)).toBe('0 s')
    expect(f.duration(3600)).toBe('1 h')
    expect(f.duration(3601)).toBe('1 h 0 min 1 s')
    expect(f.duration(5400, { seconds: false })).toBe('1 h 30 min')
  })

  it.each([
    ['en', '12,345.67', '42%'],
    ['de', '12.345,67', `42${NBSP}%`],
    ['es', '12.345,67', `42${NBSP}%`],
    ['fr', `12${NNBSP}345,67`, `42${NBSP}%`],
  ])('%s numbers and percentages', (code, n, pct) => {
    const f = formatterFor(code)
    expect(f.number(12345.67)).toBe(n)
    expect(f.percent(0.42)).toBe(pct)
  })

  it('an unknown locale code writes English', () => {
    expect(formatterFor('xx').tag).toBe('en-GB')
    expect(formatterFor(null).date('2027-08-02T00:00:00Z')).toBe('2 August 2027')
  })
})
