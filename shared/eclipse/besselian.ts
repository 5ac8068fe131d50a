import { DEG, EARTH_AXIS_RATIO, EARTH_E2, EARTH_EQUATORIAL_RADIUS_KM, HOUR_ANGLE_DEG_PER_SEC, RAD } from './constants'
import type { BesselianElements, Site } from './types'

/** Elements and their time derivatives at one instant t (hours after t0, TDT). */
export interface ElementState {
  t: number
  /** Shadow axis on the fundamental plane, Earth radii, and rates in Earth radii/hour. */
  x: number; y: number; dx: number; dy: number
  /** Declination of the axis, radians; rate in radians/hour. */
  d: number; dd: number
  sinD: number; cosD: number
  /** Greenwich hour angle of the axis referred to TDT, radians; rate in radians/hour. */
  mu: number; dmu: number
  /** Penumbral and umbral radii on the fundamental plane, Earth radii. */
  l1: number; l2: number
}

function poly(c: number[], t: number): number {
  let v = 0
  for (let i = c.length - 1; i >= 0; i--) v = v * t + c[i]!
  return v
}
function dpoly(c: number[], t: number): number {
  let v = 0
  for (let i = c.length - 1; i >= 1; i--) v = v * t + i * c[i]!
  return v
}

/** Evaluates the element polynomials at t hours after t0 (TDT). */
export function elementsAt(el: BesselianElements, t: number): ElementState {
  const d = poly(el.d, t) * DEG
  return {
    t,
    x: poly(el.x, t), y: poly(el.y, t), dx: dpoly(el.x, t), dy: dpoly(el.y, t),
    d, dd: dpoly(el.d, t) * DEG, sinD: Math.sin(d), cosD: Math.cos(d),
    mu: poly(el.mu, t) * DEG, dmu: dpoly(el.mu, t) * DEG,
    l1: poly(el.l1, t), l2: poly(el.l2, t),
  }
}

/** Geocentric constants of an observer on the WGS 84 ellipsoid. */
export interface Observer {
  latRad: number
  lonRad: number
  sinLat: number
  cosLat: number
  /** ρ·sin φ′ and ρ·cos φ′ in Earth equatorial radii (Meeus). */
  rhoSin: number
  rhoCos: number
}

export function observerOf(site: Site): Observer {
  const lat = site.latDeg * DEG
  const h = (site.elevationM ?? 0) / (EARTH_EQUATORIAL_RADIUS_KM * 1000)
  const u = Math.atan(EARTH_AXIS_RATIO * Math.tan(lat))
  return {
    latRad: lat,
    lonRad: site.lonDeg * DEG,
    sinLat: Math.sin(lat),
    cosLat: Math.cos(lat),
    rhoSin: EARTH_AXIS_RATIO * Math.sin(u) + h * Math.sin(lat),
    rhoCos: Math.cos(u) + h * Math.cos(lat),
  }
}

/** The observer on the fundamental plane at one instant, with the shadow relative to it. */
export interface ObserverState {
  /** Local hour angle of the axis, radians (west positive). */
  H: number
  xi: number; eta: number; zeta: number
  /** u = x − ξ, v = y − η: the axis relative to the observer, Earth radii. */
  u: number; v: number
  /** a, b: rates of u and v, Earth radii/hour. */
  a: number; b: number
  /** Penumbral and umbral radii in the observer's plane, Earth radii (L2 < 0: total). */
  L1: number; L2: number
}

/** Local hour angle shift from ΔT, radians: μ is referred to TDT, the Earth turns with UT. */
export function deltaTHourAngleRad(deltaTSec: number): number {
  return HOUR_ANGLE_DEG_PER_SEC * deltaTSec * DEG
}

export function observerAt(el: BesselianElements, s: ElementState, o: Observer, dHRad: number): ObserverState {
  const H = s.mu + o.lonRad - dHRad
  const sinH = Math.sin(H)
  const cosH = Math.cos(H)
  const xi = o.rhoCos * sinH
  const eta = o.rhoSin * s.cosD - o.rhoCos * cosH * s.sinD
  const zeta = o.rhoSin * s.sinD + o.rhoCos * cosH * s.cosD
  const dxi = s.dmu * o.rhoCos * cosH
  const deta = s.dmu * xi * s.sinD - zeta * s.dd
  return {
    H, xi, eta, zeta,
    u: s.x - xi, v: s.y - eta,
    a: s.dx - dxi, b: s.dy - deta,
    L1: s.l1 - zeta * el.tanF1,
    L2: s.l2 - zeta * el.tanF2,
  }
}

/** Geometric altitude (degrees) and azimuth (degrees from north through east) of the axis direction ≈ the Sun. */
export function sunAltAz(s: ElementState, o: Observer, H: number): { altitudeDeg: number; azimuthDeg: number } {
  const sinAlt = o.sinLat * s.sinD + o.cosLat * s.cosD * Math.cos(H)
  const az = Math.atan2(-s.cosD * Math.sin(H), s.sinD * o.cosLat - s.cosD * Math.cos(H) * o.sinLat)
  return {
    altitudeDeg: Math.asin(Math.max(-1, Math.min(1, sinAlt))) * RAD,
    azimuthDeg: ((az * RAD) % 360 + 360) % 360,
  }
}

/**
 * Atmospheric refraction for a geometric altitude, degrees (standard atmosphere,
 * 10 °C, 1010 hPa). Sæmundsson (1986), Sky & Telescope 72, 70; as in Meeus, Astronomical
 * Algorithms, eq. 16.4. Returns 0 below −1°.
 */
export function refractionDeg(geometricAltDeg: number): number {
  if (geometricAltDeg < -1) return 0
  const h = geometricAltDeg
  return 1.02 / Math.tan((h + 10.3 / (h + 5.11)) * DEG) / 60
}

/**
 * Where a fundamental-plane point (ξ, η) lies on the ellipsoid's sunward side, at time s.
 * Returns null when the line parallel to the shadow axis through (ξ, η) misses the Earth.
 */
export function groundPoint(s: ElementState, xi: number, eta: number, dHRad: number):
  { latDeg: number; lonDeg: number; zeta: number } | null {
  // Earth-fixed frame with P toward the axis meridian: Q = ξ, P = ζ cos d − η sin d, R = ζ sin d + η cos d.
  // Ellipsoid: P² + Q² + R²/(1−e²) = 1  →  quadratic in ζ.
  const q = 1 / (1 - EARTH_E2)
  const sd = s.sinD
  const cd = s.cosD
  const A = cd * cd + q * sd * sd
  const B = 2 * eta * sd * cd * (q - 1)
  const C = xi * xi + eta * eta * sd * sd + q * eta * eta * cd * cd - 1
  const disc = B * B - 4 * A * C
  if (disc < 0) return null
  const zeta = (-B + Math.sqrt(disc)) / (2 * A)
  const P = zeta * cd - eta * sd
  const R = zeta * sd + eta * cd
  const H = Math.atan2(xi, P)
  const lat = Math.atan2(R * q, Math.hypot(P, xi))
  let lon = (H - s.mu + dHRad) * RAD
  lon = ((lon + 180) % 360 + 360) % 360 - 180
  return { latDeg: lat * RAD, lonDeg: lon, zeta }
}
