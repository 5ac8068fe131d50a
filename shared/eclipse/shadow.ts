import { elementsAt, groundPoint, type ElementState } from './besselian'
import type { BesselianElements } from './types'

/** A ground point of the shadow geometry: geodetic latitude/longitude (degrees, east positive). */
export interface GroundPoint { latDeg: number; lonDeg: number; zeta: number }

/** Where the shadow axis meets the Earth at t (hours after t0), or null when it misses. */
export function centrePoint(el: BesselianElements, t: number, dHRad: number, s?: ElementState): GroundPoint | null {
  const st = s ?? elementsAt(el, t)
  return groundPoint(st, st.x, st.y, dHRad)
}

/**
 * The ground point that sees maximum eclipse at time t with the shadow axis passing at
 * `fraction` × L from it, perpendicular to the shadow's motion relative to that point.
 * fraction = ±1 with the umbral cone gives the northern (+) and southern (−) limits of the
 * central path; with the penumbral cone, the penumbral limits. "North" is the left-hand side
 * of the relative motion, which is north for the usual eastward track.
 * Meeus, Elements of Solar Eclipses, "northern and southern limits"; iterated on ζ.
 */
export function offsetPoint(el: BesselianElements, t: number, fraction: number, cone: 'umbra' | 'penumbra',
  dHRad: number, s?: ElementState): GroundPoint | null {
  const st = s ?? elementsAt(el, t)
  let xi = st.x
  let eta = st.y
  let g = groundPoint(st, xi, eta, dHRad)
  let zeta = g ? g.zeta : 0
  for (let i = 0; i < 8; i++) {
    const dxi = st.dmu * (zeta * st.cosD - eta * st.sinD)
    const deta = st.dmu * xi * st.sinD - zeta * st.dd
    const a = st.dx - dxi
    const b = st.dy - deta
    const n = Math.hypot(a, b)
    const L = cone === 'umbra' ? Math.abs(st.l2 - zeta * el.tanF2) : st.l1 - zeta * el.tanF1
    const nxi = st.x - (fraction * L * b) / n
    const neta = st.y + (fraction * L * a) / n
    const done = Math.abs(nxi - xi) < 1e-10 && Math.abs(neta - eta) < 1e-10
    xi = nxi
    eta = neta
    g = groundPoint(st, xi, eta, dHRad)
    if (!g) return null
    zeta = g.zeta
    if (done) break
  }
  return g
}
