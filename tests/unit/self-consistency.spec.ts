import { describe, expect, it } from 'vitest'
import {
  deltaTHourAngleRad, eclipsePath, greatestEclipse, greatestT, localCircumstances, offsetPoint, pathOffset,
  centrePoint, utcMsToT,
} from '../../shared/eclipse'
import { canonSet } from './reference'

const el = canonSet('2027-08-02')
const dT = el.deltaTSec
const dH = deltaTHourAngleRad(dT)

describe('self-consistency of the path (Canon elements, 2027-08-02)', () => {
  it.each([-1.5, -0.75, 0, 0.75, 1.5])('a point on the northern or southern limit at t0%+dh has a central duration of about 0', (h) => {
    for (const side of [1, -1]) {
      const p = offsetPoint(el, greatestT(el) + h, side, 'umbra', dH)!
      const lc = localCircumstances(el, { latDeg: p.latDeg, lonDeg: p.lonDeg }, dT)
      expect(lc.durationSec).toBeLessThan(3)
      // 1 km inside the limit totality is seen, 1 km outside it is not
      const inside = offsetPoint(el, greatestT(el) + h, side * 0.99, 'umbra', dH)!
      expect(localCircumstances(el, { latDeg: inside.latDeg, lonDeg: inside.lonDeg }, dT).type).toBe('total')
      const outside = offsetPoint(el, greatestT(el) + h, side * 1.01, 'umbra', dH)!
      expect(localCircumstances(el, { latDeg: outside.latDeg, lonDeg: outside.lonDeg }, dT).type).toBe('partial')
    }
  })

  it('the centreline tick at time T has its maximum at T', () => {
    const fc = eclipsePath(el, { stepSec: 600 })
    const ticks = fc.features.filter((f) => f.properties.kind === 'tick' && f.properties.line === 'centre')
    expect(ticks.length).toBeGreaterThan(10)
    for (const t of ticks) {
      const [lon, lat] = (t.geometry as { coordinates: [number, number] }).coordinates
      const lc = localCircumstances(el, { latDeg: lat, lonDeg: lon }, dT)
      expect(Math.abs(lc.max!.utcMs - Date.parse(t.properties.utc as string))).toBeLessThan(150) // ticks are rounded to 1e-6°
    }
  })

  it('duration across the path follows the bulletin rule of thumb D·√(1 − (2a/W)²), loosely', () => {
    // Rule of thumb from NASA eclipse bulletins (common practice); the engine computes the exact value.
    const g = greatestEclipse(el, dT)
    const W = g.pathWidthKm!
    const D = g.centralDurationSec!
    for (const f of [-0.8, -0.5, 0.3, 0.6, 0.9]) {
      const p = offsetPoint(el, g.t, f, 'umbra', dH)!
      const off = pathOffset(el, { latDeg: p.latDeg, lonDeg: p.lonDeg }, dT)!
      const a = Math.abs(off.centrelineDistanceKm)
      const rule = D * Math.sqrt(Math.max(0, 1 - (2 * a / W) ** 2))
      const exact = localCircumstances(el, { latDeg: p.latDeg, lonDeg: p.lonDeg }, dT).durationSec
      expect(Math.abs(exact - rule)).toBeLessThan(0.1 * D)
      expect(Math.sign(off.centrelineDistanceKm)).toBe(Math.sign(f))
    }
  })

  it('the signed centreline distance and limit distance add up to the half-width', () => {
    const g = greatestEclipse(el, dT)
    const p = offsetPoint(el, g.t, 0.5, 'umbra', dH)!
    const off = pathOffset(el, { latDeg: p.latDeg, lonDeg: p.lonDeg }, dT)!
    expect(off.centrelineDistanceKm + off.limitDistanceKm).toBeGreaterThan(g.pathWidthKm! / 2 - 3)
    expect(off.centrelineDistanceKm + off.limitDistanceKm).toBeLessThan(g.pathWidthKm! / 2 + 3)
  })

  it('a centreline point at a given UTC sees maximum at that UTC', () => {
    const utc = Date.parse('2027-08-02T09:30:00Z')
    const c = centrePoint(el, utcMsToT(el, utc, dT), dH)!
    const lc = localCircumstances(el, { latDeg: c.latDeg, lonDeg: c.lonDeg }, dT)
    expect(Math.abs(lc.max!.utcMs - utc)).toBeLessThan(50)
    expect(lc.type).toBe('total')
  })

  it('an annular eclipse has an annular central phase and magnitude below 1', () => {
    const ann = canonSet('2023-10-14')
    const g = greatestEclipse(ann, 73.7)
    const lc = localCircumstances(ann, { latDeg: g.latDeg, lonDeg: g.lonDeg }, 73.7)
    expect(lc.type).toBe('annular')
    expect(lc.magnitude).toBeLessThan(1)
    expect(lc.obscuration).toBeCloseTo(lc.moonSunRatio ** 2, 6)
  })

  it('a site far from the path sees nothing, and one outside the umbra a partial eclipse', () => {
    expect(localCircumstances(el, { latDeg: -60, lonDeg: -120 }, dT).type).toBe('none')
    const lc = localCircumstances(el, { latDeg: 48.85, lonDeg: 2.35 }, dT) // Paris
    expect(lc.type).toBe('partial')
    expect(lc.c2).toBeUndefined()
    expect(lc.magnitude).toBeGreaterThan(0)
    expect(lc.magnitude).toBeLessThan(1)
  })

  it('moving ΔT by 1 s moves the path by about 0.004° of longitude (trade fact)', () => {
    const t = greatestT(el)
    const a = centrePoint(el, t, deltaTHourAngleRad(dT))!
    const b = centrePoint(el, t, deltaTHourAngleRad(dT + 1))!
    expect(Math.abs(b.lonDeg - a.lonDeg)).toBeCloseTo(0.00418, 4)
  })
})

describe('Sun position against an independent library', () => {
  it('the engine’s Sun altitude and azimuth at maximum agree with suncalc within 0.3°', async () => {
    // suncalc 2 (npm), a simpler solar model: an independent check of the engine's alt/az.
    const SunCalc = await import('suncalc')
    for (const [lat, lon] of [[25.6872, 32.6396], [36.0143, -5.6044], [21.4858, 39.1925]] as const) {
      const lc = localCircumstances(el, { latDeg: lat, lonDeg: lon }, dT)
      const p = SunCalc.getPosition(new Date(lc.max!.utcMs), lat, lon)
      expect(Math.abs(p.altitude - lc.max!.altitudeDeg)).toBeLessThan(0.3)
      expect(Math.abs(((p.azimuth - lc.max!.azimuthDeg + 540) % 360) - 180)).toBeLessThan(0.5)
    }
  })
})
