import { describe, expect, it } from 'vitest'
import { computedElementsFor } from '../../server/eclipse/catalogue'
import { resolveTimeBasis } from '../../server/eclipse/report'
import { inverse } from '../../shared/eclipse/geodesy'
import { localCircumstances } from '../../shared/eclipse/local'
import { courseTrack, movingLocalCircumstances } from '../../shared/eclipse/moving'
import { centrePoint } from '../../shared/eclipse/shadow'
import { deltaTHourAngleRad } from '../../shared/eclipse/besselian'
import { utcMsToT } from '../../shared/eclipse/time'

const el = computedElementsFor('2027-08-02')!
const dt = resolveTimeBasis(el, null)

// Sea points near the centreline of 2 August 2027 (Atlantic, Alboran Sea, Gulf of Sidra, Red Sea, Gulf of Aden, Indian Ocean),
// read off the computed centreline.
const SEA = [
  { latDeg: 34.5, lonDeg: -18.6 },
  { latDeg: 35.7, lonDeg: -1.2 },
  { latDeg: 32.4, lonDeg: 19.1 },
  { latDeg: 21.9, lonDeg: 38.2 },
  { latDeg: 12.2, lonDeg: 49.3 },
  { latDeg: 4.1, lonDeg: 59.0 },
]

describe('an observer moving through the eclipse', () => {
  it('at speed 0 agrees with the stationary local circumstances (same contacts to 1 ms)', () => {
    for (const at of SEA) {
      const still = localCircumstances(el, at, dt.deltaTSec, dt.ttMinusClockSec)
      expect(still.type).toBe('total')
      const moving = movingLocalCircumstances(el, courseTrack(at, still.max!.utcMs, 90, 0), dt.deltaTSec, dt.ttMinusClockSec)
      expect(moving.type).toBe('total')
      for (const k of ['c1', 'c2', 'max', 'c3', 'c4'] as const) {
        // Both solve the same equations to better than a millisecond (the stationary iteration to 36 µs, the bisection to 4 µs);
        // maximum is a minimum, flat to first order, so its instant is looser: 50 ms.
        expect(Math.abs(moving[k]!.utcMs - still[k]!.utcMs), `${k} at ${at.latDeg},${at.lonDeg}`).toBeLessThan(k === 'max' ? 50 : 1)
        expect(moving[k]!.altitudeDeg).toBeCloseTo(still[k]!.altitudeDeg, 3)
      }
      expect(moving.durationSec).toBeCloseTo(still.durationSec, 2)
    }
  })

  it('running with the shadow along the centreline lengthens totality by the ratio of the speeds; running against it shortens it', () => {
    // Worked by hand: on the centreline the umbra's chord is its diameter D on the ground; it passes a fixed
    // observer at the shadow's ground speed V, so totality lasts D / V. An observer running the same way at
    // speed w sees it pass at V − w: totality lasts D / (V − w), i.e. (V / (V − w)) times as long; against
    // it, V / (V + w). V is measured here from the centreline's ground track a minute either side of maximum.
    const at = { latDeg: 12.2, lonDeg: 49.3 }
    const still = localCircumstances(el, at, dt.deltaTSec, dt.ttMinusClockSec)
    const t = utcMsToT(el, still.max!.utcMs, dt.ttMinusClockSec)
    const dH = deltaTHourAngleRad(dt.deltaTSec)
    // The centreline point at maximum, and the shadow's ground velocity there.
    const centre = centrePoint(el, t, dH)!
    const before = centrePoint(el, t - 1 / 60, dH)!
    const after = centrePoint(el, t + 1 / 60, dH)!
    const step = inverse(before.latDeg, before.lonDeg, after.latDeg, after.lonDeg)
    const shadowKmH = step.distanceKm / (2 / 60)
    const onLine = { latDeg: centre.latDeg, lonDeg: centre.lonDeg }
    const base = localCircumstances(el, onLine, dt.deltaTSec, dt.ttMinusClockSec).durationSec
    for (const [speedKn, heading] of [[35, step.bearingDeg], [300, step.bearingDeg], [300, (step.bearingDeg + 180) % 360]] as const) {
      const w = speedKn * 1.852
      const along = heading === step.bearingDeg
      const expected = base * (along ? shadowKmH / (shadowKmH - w) : shadowKmH / (shadowKmH + w))
      const moving = movingLocalCircumstances(el, courseTrack(onLine, still.max!.utcMs, heading, speedKn), dt.deltaTSec, dt.ttMinusClockSec)
      // The hand-worked ratio assumes a straight track and a constant shadow speed over the few minutes of
      // totality (first order); 1 % of the change in duration plus 0.1 s is a generous bound for the second-order
      // terms (the shadow's ground speed and direction change by well under 1 % in those minutes).
      const change = Math.abs(expected - base)
      expect(Math.abs(moving.durationSec - expected), `${speedKn} kn ${along ? 'with' : 'against'}`).toBeLessThan(0.01 * change + 0.1)
      if (along) expect(moving.durationSec).toBeGreaterThan(base)
      else expect(moving.durationSec).toBeLessThan(base)
    }
  })
})
