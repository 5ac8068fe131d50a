import { describe, expect, it } from 'vitest'
import { parseAngle, parseCoordinatePair } from '../../shared/geo/coordinates'
import { validateSiteRows } from '../../shared/schemas/sites'

describe('coordinate parsing', () => {
  it.each([
    ['25.6872, 32.6396', 25.6872, 32.6396],
    ['-33.8688 151.2093', -33.8688, 151.2093],
    [`25°41'14"N 32°38'23"E`, 25 + 41 / 60 + 14 / 3600, 32 + 38 / 60 + 23 / 3600],
    [`36°0'51.5"N, 5°36'15.8"W`, 36 + 0 / 60 + 51.5 / 3600, -(5 + 36 / 60 + 15.8 / 3600)],
    ['N 21 29.15, E 39 11.55', 21 + 29.15 / 60, 39 + 11.55 / 60],
    ['42 7 48 N 80 5 24 W', 42 + 7 / 60 + 48 / 3600, -(80 + 5 / 60 + 24 / 3600)],
  ])('%s', (text, lat, lon) => {
    const r = parseCoordinatePair(text)
    expect('error' in r).toBe(false)
    if (!('error' in r)) {
      expect(r.lat).toBeCloseTo(lat, 6)
      expect(r.lon).toBeCloseTo(lon, 6)
    }
  })
  it.each(['91, 0', '0, 181', 'hello', `25°61'0"N 32°E`, '12'])('rejects %s', (text) => {
    expect('error' in parseCoordinatePair(text)).toBe(true)
  })
  it('does not take a longitude letter for latitude', () => { expect(parseAngle('32 E', 'lat')).toBeNull() })
})

describe('site CSV rows', () => {
  it('names the row and field of each problem; row 1 is the header', () => {
    const { rows, errors } = validateSiteRows([
      { name: 'Good', lat: '25.5', lon: '32.1' },
      { name: 'Bad lat', lat: '25,5x', lon: '32.1' },
      { name: '', lat: '10', lon: '200' },
    ])
    expect(rows).toHaveLength(1)
    expect(errors).toEqual(expect.arrayContaining([
      { row: 3, field: 'lat', message: 'Latitude must be a decimal number' },
      { row: 4, field: 'name', message: 'Give the site a name' },
      { row: 4, field: 'lon', message: 'Longitude must be -180 to 180' },
    ]))
  })
  it('accepts optional elevation and notes', () => {
    const { rows, errors } = validateSiteRows([{ name: 'A', lat: '1', lon: '2', elevation: '350', notes: 'ridge' }, { name: 'B', lat: '1', lon: '2', elevation: '' }])
    expect(errors).toEqual([])
    expect(rows[0]).toMatchObject({ elevationM: 350, notes: 'ridge' })
    expect(rows[1]!.elevationM).toBeUndefined()
  })
})
