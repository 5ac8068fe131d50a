import { deltaTHourAngleRad, refractionDeg } from './besselian'
import { DEG, EARTH_AXIS_RATIO, EARTH_EQUATORIAL_RADIUS_KM, RAD } from './constants'
import type { BesselianElements } from './types'

/** What the duration-only evaluation gives for one point. */
export interface CentralSample {
  /** C3 − C2, seconds; 0 outside the central path. */
  durationSec: number
  /** The Sun's altitude at maximum with standard refraction, degrees. */
  sunAltitudeDeg: number
  /** Instant of maximum, hours after t0 (TDT): a good first guess for the next point along a row. */
  tMax: number
}

/**
 * A fast evaluator of the central phase's duration at many points, for surfaces and searches.
 * Same method as {@link localCircumstances} (Meeus, Elements of Solar Eclipses, local circumstances:
 * the instant of maximum by iteration, then the inner contacts by the contact iteration), written out
 * without objects so one core does several hundred thousand points a second. Agreement with the full
 * evaluation is a test (tests/unit/surface.spec.ts).
 */
export function centralDurationEvaluator(el: BesselianElements, deltaTSec: number) {
  const dH = deltaTHourAngleRad(deltaTSec)
  const [x0, x1, x2, x3] = [el.x[0] ?? 0, el.x[1] ?? 0, el.x[2] ?? 0, el.x[3] ?? 0]
  const [y0, y1, y2, y3] = [el.y[0] ?? 0, el.y[1] ?? 0, el.y[2] ?? 0, el.y[3] ?? 0]
  const [d0, d1, d2] = [(el.d[0] ?? 0) * DEG, (el.d[1] ?? 0) * DEG, (el.d[2] ?? 0) * DEG]
  const [m0, m1, m2] = [(el.mu[0] ?? 0) * DEG, (el.mu[1] ?? 0) * DEG, (el.mu[2] ?? 0) * DEG]
  const [l0, l1, l2] = [el.l2[0] ?? 0, el.l2[1] ?? 0, el.l2[2] ?? 0]
  const tanF2 = el.tanF2
  // Working state of the last evaluation (no allocation in the loop).
  let u = 0, v = 0, a = 0, b = 0, L2 = 0, sinD = 0, cosD = 0, cosH = 0
  let rhoSin = 0, rhoCos = 0, lonRad = 0

  function at(t: number) {
    const x = x0 + t * (x1 + t * (x2 + t * x3))
    const y = y0 + t * (y1 + t * (y2 + t * y3))
    const dx = x1 + t * (2 * x2 + 3 * t * x3)
    const dy = y1 + t * (2 * y2 + 3 * t * y3)
    const d = d0 + t * (d1 + t * d2)
    const dd = d1 + 2 * t * d2
    const mu = m0 + t * (m1 + t * m2)
    const dmu = m1 + 2 * t * m2
    sinD = Math.sin(d); cosD = Math.cos(d)
    const H = mu + lonRad - dH
    const sinH = Math.sin(H)
    cosH = Math.cos(H)
    const xi = rhoCos * sinH
    const eta = rhoSin * cosD - rhoCos * cosH * sinD
    const zeta = rhoSin * sinD + rhoCos * cosH * cosD
    u = x - xi
    v = y - eta
    a = dx - dmu * rhoCos * cosH
    b = dy - (dmu * xi * sinD - zeta * dd)
    L2 = l0 + t * (l1 + t * l2) - zeta * tanF2
  }

  /** One inner contact (which = −1 for C2, +1 for C3), three contact iterations from the maximum. */
  function contact(tMax: number, which: number): number {
    let t = tMax
    for (let i = 0; i < 3; i++) {
      at(t)
      const L = Math.abs(L2)
      const n2 = a * a + b * b
      const n = Math.sqrt(n2)
      const S = (a * v - u * b) / (n * L)
      if (Math.abs(S) > 1) return Number.NaN
      const tau = -(u * a + v * b) / n2 + (which * L * Math.sqrt(1 - S * S)) / n
      t += tau
      if (Math.abs(tau) < 1e-7) break
    }
    return t
  }

  return function evaluate(latDeg: number, lonDeg: number, elevationM = 0, tGuess = 0): CentralSample {
    const lat = latDeg * DEG
    const sinLat = Math.sin(lat), cosLat = Math.cos(lat)
    const h = elevationM / (EARTH_EQUATORIAL_RADIUS_KM * 1000)
    const uu = Math.atan(EARTH_AXIS_RATIO * Math.tan(lat))
    rhoSin = EARTH_AXIS_RATIO * Math.sin(uu) + h * sinLat
    rhoCos = Math.cos(uu) + h * cosLat
    lonRad = lonDeg * DEG
    let t = tGuess
    for (let i = 0; i < 12; i++) {
      at(t)
      const tau = -(u * a + v * b) / (a * a + b * b)
      t += tau
      if (Math.abs(tau) < 1e-7) break
    }
    at(t)
    const tMax = t
    const sinAlt = sinLat * sinD + cosLat * cosD * cosH
    const geometric = Math.asin(Math.max(-1, Math.min(1, sinAlt))) * RAD
    const sunAltitudeDeg = geometric + refractionDeg(geometric)
    if (Math.hypot(u, v) >= Math.abs(L2)) return { durationSec: 0, sunAltitudeDeg, tMax }
    const t2 = contact(tMax, -1)
    const t3 = contact(tMax, 1)
    const durationSec = Number.isFinite(t2) && Number.isFinite(t3) ? (t3 - t2) * 3600 : 0
    return { durationSec, sunAltitudeDeg, tMax }
  }
}
