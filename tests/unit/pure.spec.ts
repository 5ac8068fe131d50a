import { describe, expect, it } from 'vitest'
import { direct, inverse, isoTenths, jdOfDate, obscurationOf, refractionDeg } from '../../shared/eclipse'
import { clockDirection } from '../../server/eclipse/report'

describe('geodesy (Vincenty on WGS 84)', () => {
  // Flinders Peak → Buninyong, the worked example of Geoscience Australia's geodetic calculations
  // (values from memory: 54 972.271 m, forward azimuth 306° 52′ 05.37″).
  const fp = { lat: -(37 + 57 / 60 + 3.7203 / 3600), lon: 144 + 25 / 60 + 29.5244 / 3600 }
  const bu = { lat: -(37 + 39 / 60 + 10.1561 / 3600), lon: 143 + 55 / 60 + 35.3839 / 3600 }
  it('inverse gives the published distance and azimuth', () => {
    const r = inverse(fp.lat, fp.lon, bu.lat, bu.lon)
    expect(r.distanceKm).toBeCloseTo(54.972271, 5)
    expect(r.bearingDeg).toBeCloseTo(306 + 52 / 60 + 5.37 / 3600, 4)
  })
  it('direct inverts inverse', () => {
    const r = inverse(fp.lat, fp.lon, bu.lat, bu.lon)
    const p = direct(fp.lat, fp.lon, r.bearingDeg, r.distanceKm)
    expect(p.latDeg).toBeCloseTo(bu.lat, 8)
    expect(p.lonDeg).toBeCloseTo(bu.lon, 8)
  })
})

describe('obscuration', () => {
  it.each([
    [1.05, 0, 1], [0.95, 0, 0.9025], [1, 2.1, 0], [1, 2, 0],
  ])('k=%f, c=%f → %f', (k, c, want) => { expect(obscurationOf(k, c)).toBeCloseTo(want, 6) })
  it('matches a numerical integration for a partial overlap', () => {
    const k = 1.02, c = 0.7
    let hit = 0, n = 0
    for (let x = -1; x <= 1; x += 0.002) for (let y = -1; y <= 1; y += 0.002) {
      if (x * x + y * y > 1) continue
      n++
      if ((x - c) ** 2 + y * y <= k * k) hit++
    }
    expect(obscurationOf(k, c)).toBeCloseTo(hit / n, 2)
  })
})

describe('small helpers', () => {
  it('formats UTC with tenths', () => { expect(isoTenths(Date.parse('2024-04-08T19:16:17.249Z'))).toBe('2024-04-08T19:16:17.2Z') })
  it('Julian Day of 2000-01-01 0h is 2451544.5', () => { expect(jdOfDate('2000-01-01')).toBe(2451544.5) })
  // Sæmundsson's formula: about 34′ at the horizon, about 1′ at 45° (Meeus, Astronomical Algorithms).
  it('refraction', () => {
    expect(refractionDeg(0) * 60).toBeGreaterThan(28)
    expect(refractionDeg(0) * 60).toBeLessThan(36)
    expect(refractionDeg(45) * 60).toBeCloseTo(1, 0)
  })
  it.each([[0, 12, 'top'], [60, 10, 'upper left'], [300, 2, 'upper right'], [180, 6, 'bottom'], [90, 9, 'left']])(
    'vertex angle %d° is %d o\'clock', (v, clock, words) => {
      const d = clockDirection(v)
      expect(d.clock).toBe(clock)
      expect(d.words).toContain(words)
    })
})
