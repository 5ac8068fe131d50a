import { describe, expect, it } from 'vitest'
import { localTime } from '../../shared/time/local'
import { isNauticalZone, shipZoneLabel } from '../../shared/time/shipZone'

// IANA's Etc zones carry the POSIX sign: Etc/GMT+2 is two hours behind UTC (tz database, "etcetera" file).
describe('ship\'s time zone label', () => {
  it.each([
    ['Etc/GMT+2', '-02:00', true],
    ['Etc/GMT-3', '+03:00', true],
    ['Etc/GMT+11', '-11:00', true],
  ])('%s leads with its real offset, UTC%s, and says the IANA sign is reversed', (zone, offset, nautical) => {
    const at = Date.parse('2027-08-02T10:00:00Z')
    expect(localTime(at, zone).utcOffset).toBe(offset)
    expect(isNauticalZone(zone)).toBe(nautical)
    const label = shipZoneLabel(zone, localTime(at, zone).utcOffset)
    expect(label.startsWith(`UTC${offset}, the nautical time zone`)).toBe(true)
    expect(label).toContain('sign is reversed')
  })

  it.each([['Etc/GMT', '+00:00'], ['Etc/UTC', '+00:00']])('%s is nautical with no sign to explain', (zone, offset) => {
    const label = shipZoneLabel(zone, offset)
    expect(label).toBe(`UTC${offset}, the nautical time zone at the intercept (IANA ${zone})`)
  })

  it('a civil zone inside territorial waters is named as it is, with the day\'s offset', () => {
    const off = localTime(Date.parse('2027-08-02T10:00:00Z'), 'Europe/Madrid').utcOffset
    expect(off).toBe('+02:00')
    expect(isNauticalZone('Europe/Madrid')).toBe(false)
    expect(shipZoneLabel('Europe/Madrid', off)).toBe('Europe/Madrid (UTC+02:00 on the day), the civil time zone at the intercept')
  })
})
