import { RAD } from './constants'
import {
  deltaTHourAngleRad, elementsAt, observerAt, observerOf, refractionDeg, sunAltAz,
  type Observer, type ObserverState,
} from './besselian'
import { centrePoint } from './shadow'
import { direct, ecef, inverse } from './geodesy'
import { isoTenths, tToUtcMs } from './time'
import type { BesselianElements, LocalEclipseType, Site } from './types'

export type ContactName = 'c1' | 'c2' | 'max' | 'c3' | 'c4'

/** One instant of the local eclipse. */
export interface LocalContact {
  /** Clock instant, ms since the Unix epoch: UTC when the caller gives TT − UTC, else UT1. */
  utcMs: number
  /** ISO 8601 UTC with tenths of a second. */
  utc: string
  /** Hours after t0 (TDT); internal. */
  t: number
  /** Sun's geometric altitude, degrees (−90..90). */
  altitudeDeg: number
  /** Sun's altitude with standard refraction, degrees. */
  apparentAltitudeDeg: number
  /** Sun's azimuth, degrees from true north through east (0..360). */
  azimuthDeg: number
  /** True when the Sun's centre is below the horizon (refracted altitude < 0). */
  belowHorizon: boolean
  /** Speed of the shadow axis relative to the site on the fundamental plane, Earth radii/hour. */
  relativeSpeedErPerHour: number
  /** Position angle of the contact point on the Sun's limb, degrees from celestial north through east. */
  positionAngleDeg?: number
  /** Vertex angle of the contact point, degrees from the zenith direction through east (counter-clockwise on the sky). */
  vertexAngleDeg?: number
}

export interface LocalCircumstances {
  /** What is seen at maximum, geometrically: total, annular, partial or none. */
  type: LocalEclipseType
  c1?: LocalContact
  c2?: LocalContact
  max?: LocalContact
  c3?: LocalContact
  c4?: LocalContact
  /** C3 − C2, seconds; 0 when the central phase is not seen. */
  durationSec: number
  /** Fraction of the Sun's diameter covered at maximum (≥ 1 for total). */
  magnitude: number
  /** Fraction of the Sun's disc area covered at maximum (0..1). */
  obscuration: number
  /** Moon/Sun apparent diameter ratio at maximum. */
  moonSunRatio: number
  /** Whether any of the eclipse happens with the Sun above the horizon. */
  visible: boolean
  /** ΔT used, seconds. */
  deltaTSec: number
}

interface Solved { t: number; s: ObserverState }

const MAX_ITER = 30
const TOL_H = 1e-8 // hours (36 µs)

function stateAt(el: BesselianElements, o: Observer, dH: number, t: number): ObserverState {
  return observerAt(el, elementsAt(el, t), o, dH)
}

/** Instant of maximum eclipse: (u,v)·(a,b) = 0. Meeus' iteration. */
export function solveMax(el: BesselianElements, o: Observer, dH: number, t0 = 0): Solved {
  let t = t0
  let s = stateAt(el, o, dH, t)
  for (let i = 0; i < MAX_ITER; i++) {
    const n2 = s.a * s.a + s.b * s.b
    const tau = -(s.u * s.a + s.v * s.b) / n2
    t += tau
    s = stateAt(el, o, dH, t)
    if (Math.abs(tau) < TOL_H) break
  }
  return { t, s }
}

/**
 * Instant of a contact: the Moon's limb touches the Sun's limb when √(u²+v²) = |L|.
 * which = −1 for the earlier contact (C1 or C2), +1 for the later (C3 or C4).
 */
function solveContact(el: BesselianElements, o: Observer, dH: number, tMax: number, cone: 1 | 2, which: -1 | 1): Solved | null {
  let t = tMax
  let s = stateAt(el, o, dH, t)
  for (let i = 0; i < MAX_ITER; i++) {
    const L = Math.abs(cone === 1 ? s.L1 : s.L2)
    const n2 = s.a * s.a + s.b * s.b
    const n = Math.sqrt(n2)
    const S = (s.a * s.v - s.u * s.b) / (n * L)
    if (Math.abs(S) > 1) return null
    const tau = -(s.u * s.a + s.v * s.b) / n2 + (which * L * Math.sqrt(1 - S * S)) / n
    t += tau
    s = stateAt(el, o, dH, t)
    if (Math.abs(tau) < TOL_H) return { t, s }
  }
  return { t, s }
}

/** Fraction of the Sun's disc covered by a Moon of radius ratio k at centre separation c (Sun radii). */
export function obscurationOf(k: number, c: number): number {
  if (c >= 1 + k) return 0
  if (c <= k - 1) return 1 // Moon covers the Sun
  if (c <= 1 - k) return k * k // Moon inside the Sun
  const a1 = Math.acos((c * c + 1 - k * k) / (2 * c))
  const a2 = Math.acos((c * c + k * k - 1) / (2 * c * k))
  const area = a1 + k * k * a2 - 0.5 * Math.sqrt((-c + 1 + k) * (c + 1 - k) * (c - 1 + k) * (c + 1 + k))
  return area / Math.PI
}

function contactOf(el: BesselianElements, o: Observer, solved: Solved, ttMinusClockSec: number, innerTotal: boolean, withAngles: boolean): LocalContact {
  const st = elementsAt(el, solved.t)
  const { altitudeDeg, azimuthDeg } = sunAltAz(st, o, solved.s.H)
  const apparent = altitudeDeg + refractionDeg(altitudeDeg)
  const utcMs = tToUtcMs(el, solved.t, ttMinusClockSec)
  const c: LocalContact = {
    utcMs, utc: isoTenths(utcMs), t: solved.t,
    altitudeDeg, apparentAltitudeDeg: apparent, azimuthDeg, belowHorizon: apparent < 0,
    relativeSpeedErPerHour: Math.hypot(solved.s.a, solved.s.b),
  }
  if (withAngles) {
    // The Moon's centre lies from the Sun's in direction (u, v) (x east, y north on the sky).
    let P = Math.atan2(solved.s.u, solved.s.v) * RAD
    if (innerTotal) P += 180 // inside contact of a total eclipse: the last sliver is opposite the Moon's offset
    P = ((P % 360) + 360) % 360
    const zenithPA = Math.atan2(solved.s.xi, solved.s.eta) * RAD
    c.positionAngleDeg = P
    c.vertexAngleDeg = (((P - zenithPA) % 360) + 360) % 360
  }
  return c
}

/**
 * Local circumstances of a solar eclipse at one site, from a Besselian element set.
 * Meeus, Elements of Solar Eclipses 1951–2200, ch. "Local circumstances".
 * `deltaTSec` (TT − UT1) turns the Earth; `ttMinusClockSec` turns TT instants into clock times:
 * TT − UTC for UTC (timeScales.ts), or, by default, ΔT itself for UT1 as published tables use.
 */
export function localCircumstances(el: BesselianElements, site: Site, deltaTSec = el.deltaTSec, ttMinusClockSec = deltaTSec): LocalCircumstances {
  const o = observerOf(site)
  const dH = deltaTHourAngleRad(deltaTSec)
  const mx = solveMax(el, o, dH)
  const m = Math.hypot(mx.s.u, mx.s.v)
  const { L1, L2 } = mx.s
  const out: LocalCircumstances = {
    type: 'none', durationSec: 0, magnitude: 0, obscuration: 0,
    moonSunRatio: (L1 - L2) / (L1 + L2), visible: false, deltaTSec,
  }
  if (m >= L1) return out
  const central = m < Math.abs(L2)
  out.type = central ? (L2 < 0 ? 'total' : 'annular') : 'partial'
  out.magnitude = central ? (L1 - L2) / (L1 + L2) : (L1 - m) / (L1 + L2)
  out.obscuration = obscurationOf(out.moonSunRatio, (2 * m) / (L1 + L2))
  out.max = contactOf(el, o, mx, ttMinusClockSec, false, false)
  const c1 = solveContact(el, o, dH, mx.t, 1, -1)
  const c4 = solveContact(el, o, dH, mx.t, 1, 1)
  if (c1) out.c1 = contactOf(el, o, c1, ttMinusClockSec, false, true)
  if (c4) out.c4 = contactOf(el, o, c4, ttMinusClockSec, false, true)
  if (central) {
    const c2 = solveContact(el, o, dH, mx.t, 2, -1)
    const c3 = solveContact(el, o, dH, mx.t, 2, 1)
    const total = out.type === 'total'
    if (c2) out.c2 = contactOf(el, o, c2, ttMinusClockSec, total, true)
    if (c3) out.c3 = contactOf(el, o, c3, ttMinusClockSec, total, true)
    if (c2 && c3) out.durationSec = (c3.t - c2.t) * 3600
  }
  out.visible = [out.c1, out.max, out.c4].some((c) => c && !c.belowHorizon) ||
    (!!out.c1 && !!out.c4 && out.c1.belowHorizon !== out.c4.belowHorizon)
  return out
}

/** Position of the site relative to the central path. */
export interface PathOffset {
  /** Signed geodesic distance to the centreline, km, positive on the northern side. */
  centrelineDistanceKm: number
  /** Signed offset as a fraction of the local half-width (±1 on the limits), from the fundamental plane. */
  halfWidthFraction: number
  /** Distance to the nearer limit of the central path, km (negative outside the path). */
  limitDistanceKm: number
  /** Centreline point nearest to the site. */
  nearest: { latDeg: number; lonDeg: number; t: number }
}

/** Signed fraction of the half-width at maximum: ±√(u²+v²)/|L2|, positive north of the centreline. */
export function halfWidthFractionAt(el: BesselianElements, site: Site, deltaTSec: number, tStart = 0): { f: number; t: number } {
  const o = observerOf(site)
  const dH = deltaTHourAngleRad(deltaTSec)
  const mx = solveMax(el, o, dH, tStart)
  const { u, v, a, b, L2 } = mx.s
  // Left-hand normal of the relative motion, N = (−b, a)/n; the observer sits at −(u, v) from the axis.
  const side = -u * -b + -v * a >= 0 ? 1 : -1
  return { f: (side * Math.hypot(u, v)) / Math.abs(L2), t: mx.t }
}

function chord2(p: [number, number, number], q: [number, number, number]): number {
  return (p[0] - q[0]) ** 2 + (p[1] - q[1]) ** 2 + (p[2] - q[2]) ** 2
}

/**
 * Where the site lies relative to the central path: signed distance to the centreline
 * (nearest point found by minimising the chord to the centreline curve in t), the signed
 * fraction of the half-width, and the distance to the nearer limit (found on the geodesic
 * through the site perpendicular to the centreline). Null when the eclipse has no central
 * path near the site.
 */
export function pathOffset(el: BesselianElements, site: Site, deltaTSec = el.deltaTSec): PathOffset | null {
  const dH = deltaTHourAngleRad(deltaTSec)
  const onGround: Site = { latDeg: site.latDeg, lonDeg: site.lonDeg }
  const { f, t: tMax } = halfWidthFractionAt(el, onGround, deltaTSec)
  const S = ecef(site.latDeg, site.lonDeg)
  const sq = (t: number) => {
    const c = centrePoint(el, t, dH)
    return c ? chord2(S, ecef(c.latDeg, c.lonDeg)) : Number.NaN
  }
  // Newton on d/dt of the squared chord, numerical derivatives; starts at the site's maximum.
  let t = tMax
  const h = 1 / 3600
  for (let i = 0; i < 8; i++) {
    const f0 = sq(t), fp = sq(t + h), fm = sq(t - h)
    if (![f0, fp, fm].every(Number.isFinite)) return null
    const d1 = (fp - fm) / (2 * h)
    const d2 = (fp - 2 * f0 + fm) / (h * h)
    if (d2 <= 0) break
    const step = -d1 / d2
    t += Math.max(-0.1, Math.min(0.1, step))
    if (Math.abs(step) < 1e-7) break
  }
  const c = centrePoint(el, t, dH)
  if (!c) return null
  const dist = inverse(c.latDeg, c.lonDeg, site.latDeg, site.lonDeg).distanceKm
  const sign = f >= 0 ? 1 : -1
  const centrelineDistanceKm = sign * dist
  const limitDistanceKm = limitDistance(el, c, t, centrelineDistanceKm, f, deltaTSec, dH)
  return { centrelineDistanceKm, halfWidthFraction: f, limitDistanceKm, nearest: { latDeg: c.latDeg, lonDeg: c.lonDeg, t } }
}

/** Bearing (degrees) of the centreline at t, from two nearby points. */
export function centrelineBearing(el: BesselianElements, t: number, dH: number): number | null {
  const h = 10 / 3600
  const p = centrePoint(el, t - h, dH) ?? centrePoint(el, t, dH)
  const q = centrePoint(el, t + h, dH) ?? centrePoint(el, t, dH)
  if (!p || !q || (p === q)) return null
  return inverse(p.latDeg, p.lonDeg, q.latDeg, q.lonDeg).bearingDeg
}

/**
 * Bearing (degrees from north, clockwise) from which the umbra or antumbra approaches, from the
 * centreline's ground track at t: the direction of travel turned round. Null off the path.
 */
export function shadowApproachFromDeg(el: BesselianElements, t: number, dH: number): number | null {
  const b = centrelineBearing(el, t, dH)
  return b === null ? null : (b + 180) % 360
}

/**
 * Distance (km) from the centreline point at t, along the perpendicular geodesic, to the
 * limit on one side (side = +1 north, −1 south): the root of f(s) = side, secant method.
 */
export function limitOffsetKm(el: BesselianElements, centre: { latDeg: number; lonDeg: number }, t: number,
  side: 1 | -1, deltaTSec: number, dH: number, guessKm = 100): number | null {
  const bearing = centrelineBearing(el, t, dH)
  if (bearing === null) return null
  // Bearing −90° is to the left of the direction of travel: the northern side for an eastward track.
  const fAt = (sKm: number) => {
    const p = direct(centre.latDeg, centre.lonDeg, bearing - 90, sKm)
    return halfWidthFractionAt(el, p, deltaTSec, t).f
  }
  let s0 = side * guessKm * 0.9
  let s1 = side * guessKm * 1.1
  let f0 = fAt(s0) - side
  let f1 = fAt(s1) - side
  for (let i = 0; i < 20; i++) {
    if (f1 === f0) break
    const s2 = s1 - (f1 * (s1 - s0)) / (f1 - f0)
    s0 = s1; f0 = f1
    s1 = s2; f1 = fAt(s1) - side
    if (!Number.isFinite(f1)) return null
    if (Math.abs(s1 - s0) < 1e-4) break
  }
  return Math.abs(s1)
}

function limitDistance(el: BesselianElements, centre: { latDeg: number; lonDeg: number }, t: number,
  dKm: number, f: number, deltaTSec: number, dH: number): number {
  const side: 1 | -1 = dKm >= 0 ? 1 : -1
  // First guess from the near-linear growth of f across the path.
  const guess = Math.abs(f) > 0.05 ? Math.abs(dKm / f) : 100
  const half = limitOffsetKm(el, centre, t, side, deltaTSec, dH, guess)
  return half === null ? Number.NaN : half - Math.abs(dKm)
}

