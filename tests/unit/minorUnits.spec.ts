import { describe, expect, it } from 'vitest'
import { formatMinor, minorUnitDigits, toMajorUnits } from '../../shared/money/minorUnits'

describe('minor units (ISO 4217)', () => {
  // Minor units from the ISO 4217 list (from memory): EUR, USD, GBP 2; JPY, KRW 0; KWD, BHD, JOD 3.
  it.each([['eur', 2], ['USD', 2], ['gbp', 2], ['jpy', 0], ['krw', 0], ['kwd', 3], ['bhd', 3], ['jod', 3]])('%s has %i decimals', (c, d) => {
    expect(minorUnitDigits(c)).toBe(d)
  })

  it.each([
    [123456, 'eur', '1234.56'], [5, 'eur', '0.05'], [0, 'eur', '0.00'], [-250, 'eur', '-2.50'],
    [120000, 'jpy', '120000'], [0, 'jpy', '0'],
    [1250, 'kwd', '1.250'], [7, 'kwd', '0.007'],
    // Beyond what a double holds exactly as a decimal fraction (2^53 − 1 cents).
    [9007199254740991, 'eur', '90071992547409.91'],
  ])('%i minor units of %s are %s', (minor, c, major) => {
    expect(toMajorUnits(minor, c)).toBe(major)
  })

  it('refuses a fraction of a minor unit', () => {
    expect(() => toMajorUnits(1.5, 'eur')).toThrow(/whole number/)
  })

  it('formats with the currency\'s own decimals', () => {
    expect(formatMinor(120000, 'jpy')).toBe('JP¥120,000')
    expect(formatMinor(123456, 'eur')).toBe('€1,234.56')
  })
})

describe('amounts in e-mails and staff alerts', () => {
  // A JPY trip of ¥120,000 (no minor units): the held e-mail once divided every amount by 100.
  it('use the currency\'s own decimals in every language', async () => {
    const { money } = await import('../../server/services/mailTemplates')
    const { formatMoney } = await import('../../shared/schemas/trips')
    expect(money(120000, 'jpy', 'en')).toMatch(/120,000/)
    expect(money(120000, 'jpy', 'de')).toMatch(/120\.000/)
    expect(money(1250, 'kwd', 'en')).toMatch(/1\.250/)
    expect(money(249000, 'eur', 'fr')).toMatch(/2\s?490,00/)
    expect(formatMoney(120000, 'jpy')).toMatch(/120,000/)
    expect(formatMoney(249000, 'eur')).toBe('€2,490.00')
  })
})
