import { deltaTHourAngleRad, elementsAt, groundPoint, observerOf, sunAltAz } from './besselian'
import { EARTH_E2 } from './constants'
import { limitOffsetKm, localCircumstances } from './local'
import { existenceIntervals } from './path'
import { centrePoint } from './shadow'
import { isoTenths, tToUtcMs } from './time'
import type { BesselianElements, GlobalEclipseType } from './types'

/** Circumstances of greatest eclipse: the instant the shadow axis passes closest to the Earth's centre. */
export interface GreatestEclipse {
  type: GlobalEclipseType
  /** Whether the axis meets the Earth (a central path exists). */
  central: boolean
  /** Hours after t0 (TDT). */
  t: number
  /** UTC instant, ms, and ISO string with tenths. */
  utcMs: number
  utc: string
  /** Point of greatest eclipse, geodetic degrees, east positive. */
  latDeg: number
  lonDeg: number
  /** Sun's geometric altitude there, degrees. */
  sunAltitudeDeg: number
  /** Least distance of the axis from the Earth's centre, Earth radii, signed by y (south negative). */
  gamma: number
  /** Magnitude at greatest eclipse (Moon/Sun diameter ratio for central eclipses). */
  magnitude: number
  /** Central duration at the point of greatest eclipse, seconds; null when not central. */
  centralDurationSec: number | null
  /** Width of the central path at greatest eclipse, km, perpendicular to the centreline; null when not central. */
  pathWidthKm: number | null
  /** ΔT used, seconds. */
  deltaTSec: number
}

/** t of least x² + y² (Newton on x·x′ + y·y′ = 0). */
export function greatestT(el: BesselianElements): number {
  let t = 0
  for (let i = 0; i < 30; i++) {
    const h = 1e-4
    const g = (tt: number) => { const s = elementsAt(el, tt); return s.x * s.dx + s.y * s.dy }
    const g0 = g(t)
    const step = -g0 / ((g(t + h) - g(t - h)) / (2 * h))
    t += step
    if (Math.abs(step) < 1e-9) break
  }
  return t
}

/** `ttMinusClockSec` as in localCircumstances: TT − UTC for UTC, ΔT (the default) for UT1. */
export function greatestEclipse(el: BesselianElements, deltaTSec = el.deltaTSec, ttMinusClockSec = deltaTSec): GreatestEclipse {
  const dH = deltaTHourAngleRad(deltaTSec)
  const t = greatestT(el)
  const st = elementsAt(el, t)
  const gamma = Math.sign(st.y || 1) * Math.hypot(st.x, st.y)
  const utcMs = tToUtcMs(el, t, ttMinusClockSec)
  const centre = centrePoint(el, t, dH, st)
  let latDeg: number, lonDeg: number, magnitude: number
  let type: GlobalEclipseType
  let centralDurationSec: number | null = null
  let pathWidthKm: number | null = null
  if (centre) {
    latDeg = centre.latDeg
    lonDeg = centre.lonDeg
    const lc = localCircumstances(el, { latDeg, lonDeg }, deltaTSec)
    magnitude = lc.magnitude
    centralDurationSec = lc.durationSec
    const n = limitOffsetKm(el, centre, t, 1, deltaTSec, dH)
    const s = limitOffsetKm(el, centre, t, -1, deltaTSec, dH)
    pathWidthKm = n !== null && s !== null ? n + s : null
    // Hybrid when the sign of L2 on the centreline changes between the ends and greatest eclipse.
    const L2c = st.l2 - centre.zeta * el.tanF2
    const iv = existenceIntervals((tt) => centrePoint(el, tt, dH) !== null)
    const signs = new Set<number>([Math.sign(L2c)])
    for (const [a, b] of iv) {
      for (const tt of [a, b]) {
        const c = centrePoint(el, tt, dH)
        if (c) signs.add(Math.sign(elementsAt(el, tt).l2 - c.zeta * el.tanF2))
      }
    }
    type = signs.size > 1 ? 'hybrid' : L2c < 0 ? 'total' : 'annular'
  } else {
    // Not central: greatest eclipse is on the limb, nearest the axis.
    const q = 1 / (1 - EARTH_E2)
    const etaMax = 1 / Math.sqrt(st.sinD ** 2 + q * st.cosD ** 2)
    const ps = Math.atan2(st.y / etaMax, st.x)
    const xi = Math.cos(ps) * (1 - 1e-9)
    const eta = Math.sin(ps) * etaMax * (1 - 1e-9)
    const g = groundPoint(st, xi, eta, dH)!
    latDeg = g.latDeg
    lonDeg = g.lonDeg
    const delta = Math.hypot(st.x - xi, st.y - eta)
    magnitude = (st.l1 - delta) / (st.l1 + st.l2)
    // Non-central total or annular: the umbra touches the Earth without its axis doing so.
    type = delta < Math.abs(st.l2) ? (st.l2 < 0 ? 'total' : 'annular') : 'partial'
  }
  const o = observerOf({ latDeg, lonDeg })
  const sunAltitudeDeg = sunAltAz(st, o, st.mu + o.lonRad - dH).altitudeDeg
  return {
    type, central: !!centre, t, utcMs, utc: isoTenths(utcMs), latDeg, lonDeg, sunAltitudeDeg,
    gamma, magnitude, centralDurationSec, pathWidthKm, deltaTSec,
  }
}
