import {
  deltaTHourAngleRad, elementsAt, observerAt, observerOf, refractionDeg, sunAltAz, type ObserverState,
} from './besselian'
import { direct } from './geodesy'
import { isoTenths, tToUtcMs, utcMsToT } from './time'
import type { BesselianElements, LocalEclipseType, Site } from './types'

/**
 * Local circumstances for an observer who moves during the eclipse (a ship holding its course).
 *
 * The stationary solution (local.ts) iterates on the observer's fixed position; here the position is
 * a function of time, so every quantity is evaluated with the observer where they are at that
 * instant, and the contacts are the roots of
 *
 *   g(t) = √(u(t)² + v(t)²) − |L(t)|
 *
 * (u, v: the shadow axis relative to the observer on the fundamental plane; L: the penumbral radius
 * for C1/C4, the umbral for C2/C3, in the observer's plane; Meeus, Elements of Solar Eclipses,
 * "Local circumstances", with the observer's ξ, η, ζ recomputed at each t). Maximum is the minimum of
 * m(t) = √(u² + v²). Roots are bracketed by stepping one minute at a time from maximum and then
 * bisected to a few microseconds, so no derivative of the track is needed.
 */

/** Where the observer is at a clock instant (ms since the Unix epoch). */
export type Track = (utcMs: number) => Site

export interface MovingContact {
  utcMs: number
  utc: string
  t: number
  latDeg: number
  lonDeg: number
  altitudeDeg: number
  apparentAltitudeDeg: number
  azimuthDeg: number
  belowHorizon: boolean
}

export interface MovingCircumstances {
  type: LocalEclipseType
  c1?: MovingContact
  c2?: MovingContact
  max?: MovingContact
  c3?: MovingContact
  c4?: MovingContact
  /** C3 − C2, seconds; 0 when the central phase is not seen. */
  durationSec: number
  /** Fraction of the Sun's diameter covered at maximum. */
  magnitude: number
}

const STEP_H = 1 / 60
const SEARCH_H = 4
const TOL_H = 1e-9

/**
 * A course held at constant speed and true heading (a rhumb line is not needed over the minutes of an
 * eclipse: the geodesic from the reference point is used), passing `at` at the instant `atUtcMs`.
 */
export function courseTrack(at: Site, atUtcMs: number, headingDeg: number, speedKn: number): Track {
  const kmPerMs = (speedKn * 1.852) / 3_600_000
  return (utcMs) => {
    const km = kmPerMs * (utcMs - atUtcMs)
    if (km === 0) return at
    const p = km > 0 ? direct(at.latDeg, at.lonDeg, headingDeg, km) : direct(at.latDeg, at.lonDeg, (headingDeg + 180) % 360, -km)
    return { latDeg: p.latDeg, lonDeg: p.lonDeg, elevationM: at.elevationM }
  }
}

export function movingLocalCircumstances(el: BesselianElements, track: Track, deltaTSec = el.deltaTSec, ttMinusClockSec = deltaTSec,
  guessUtcMs?: number): MovingCircumstances {
  const dH = deltaTHourAngleRad(deltaTSec)
  const siteAt = (t: number) => track(tToUtcMs(el, t, ttMinusClockSec))
  const stateAt = (t: number): { s: ObserverState; site: Site } => {
    const site = siteAt(t)
    return { s: observerAt(el, elementsAt(el, t), observerOf(site), dH), site }
  }
  const m = (t: number) => { const { s } = stateAt(t); return Math.hypot(s.u, s.v) }

  // Maximum: the smallest m over the element window, found on a one-minute scan and refined by
  // golden-section search in the bracketing two minutes.
  const t0 = guessUtcMs === undefined ? 0 : utcMsToT(el, guessUtcMs, ttMinusClockSec)
  let best = t0, bestM = Infinity
  for (let t = t0 - SEARCH_H; t <= t0 + SEARCH_H; t += STEP_H) {
    const v = m(t)
    if (v < bestM) { bestM = v; best = t }
  }
  let lo = best - STEP_H, hi = best + STEP_H
  const gr = (Math.sqrt(5) - 1) / 2
  let c = hi - gr * (hi - lo), d = lo + gr * (hi - lo)
  let fc = m(c), fd = m(d)
  while (hi - lo > TOL_H) {
    if (fc < fd) { hi = d; d = c; fd = fc; c = hi - gr * (hi - lo); fc = m(c) } else { lo = c; c = d; fc = fd; d = lo + gr * (hi - lo); fd = m(d) }
  }
  const tMax = (lo + hi) / 2
  const mx = stateAt(tMax)
  const mMax = Math.hypot(mx.s.u, mx.s.v)
  const { L1, L2 } = mx.s
  const out: MovingCircumstances = { type: 'none', durationSec: 0, magnitude: 0 }
  if (mMax >= L1) return out
  const central = mMax < Math.abs(L2)
  out.type = central ? (L2 < 0 ? 'total' : 'annular') : 'partial'
  out.magnitude = central ? (L1 - L2) / (L1 + L2) : (L1 - mMax) / (L1 + L2)

  const contact = (t: number): MovingContact => {
    const { site } = stateAt(t)
    const st = elementsAt(el, t)
    const o = observerOf(site)
    const { altitudeDeg, azimuthDeg } = sunAltAz(st, o, observerAt(el, st, o, dH).H)
    const apparent = altitudeDeg + refractionDeg(altitudeDeg)
    const utcMs = tToUtcMs(el, t, ttMinusClockSec)
    return { utcMs, utc: isoTenths(utcMs), t, latDeg: site.latDeg, lonDeg: site.lonDeg, altitudeDeg, apparentAltitudeDeg: apparent, azimuthDeg, belowHorizon: apparent < 0 }
  }
  const g = (t: number, cone: 1 | 2) => { const { s } = stateAt(t); return Math.hypot(s.u, s.v) - Math.abs(cone === 1 ? s.L1 : s.L2) }
  // From maximum (g < 0) outwards until g changes sign, then bisection.
  const root = (cone: 1 | 2, which: -1 | 1): number | null => {
    let a = tMax
    for (let k = 1; k * STEP_H <= SEARCH_H; k++) {
      const b = tMax + which * k * STEP_H
      if (g(b, cone) >= 0) {
        let inside = a, outside = b
        while (Math.abs(outside - inside) > TOL_H) {
          const mid = (inside + outside) / 2
          if (g(mid, cone) < 0) inside = mid
          else outside = mid
        }
        return (inside + outside) / 2
      }
      a = b
    }
    return null
  }
  out.max = contact(tMax)
  const c1 = root(1, -1), c4 = root(1, 1)
  if (c1 !== null) out.c1 = contact(c1)
  if (c4 !== null) out.c4 = contact(c4)
  if (central) {
    const c2 = root(2, -1), c3 = root(2, 1)
    if (c2 !== null) out.c2 = contact(c2)
    if (c3 !== null) out.c3 = contact(c3)
    if (c2 !== null && c3 !== null) out.durationSec = (c3 - c2) * 3600
  }
  return out
}
