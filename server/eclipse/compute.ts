import {
  AU_KM, EARTH_EQUATORIAL_RADIUS_KM, K_PENUMBRA, K_UMBRA, SUN_RADIUS_ARCSEC_AT_1AU,
} from '../../shared/eclipse/constants'
import { deltaTAt } from '../../shared/eclipse/deltaT'
import { ELEMENT_WINDOW_H } from '../../shared/eclipse/path'
import type { BesselianElements } from '../../shared/eclipse/types'
import { apparentMoon, apparentSun, gastDegAtTdt } from './ephemeris'

/** Solar radius, Earth radii: 959.63″ at 1 au. */
const SUN_RADIUS_ER = (Math.tan((SUN_RADIUS_ARCSEC_AT_1AU / 3600) * (Math.PI / 180)) * AU_KM) / EARTH_EQUATORIAL_RADIUS_KM
const J2000_UNIX_MS = Date.UTC(2000, 0, 1, 12)
const J2000_JD = 2451545.0

type Vec = [number, number, number]

/** Provenance line carried by every computed set. */
export const COMPUTED_SOURCE = 'Umbrafield, computed from VSOP87 (Sun) and ELP/MPP02-DE405 (Moon) via astronomia (k = 0.2724880 / 0.2722810, R☉ = 959.63″)'

export interface ElementSample {
  t: number; x: number; y: number; dDeg: number; muDeg: number; l1: number; l2: number; tanF1: number; tanF2: number
}

/**
 * The unfitted elements at one TT instant (days since J2000, TT). Explanatory Supplement (1992)
 * §8.3; Meeus, Elements of Solar Eclipses. `moonDistanceKm` (optional) is the Earth–Moon distance
 * near that instant, for the light-time correction.
 */
export function elementSample(ttDays: number, t: number, moonDistanceKm?: number): ElementSample & { moonDistanceKm: number } {
  const jde = J2000_JD + ttDays
  const sun = apparentSun(jde)
  const m = apparentMoon(jde, moonDistanceKm)
  const moon = m.vec
  const g: Vec = [sun[0] - moon[0], sun[1] - moon[1], sun[2] - moon[2]]
  const G = Math.hypot(...g)
  const a = Math.atan2(g[1], g[0])
  const d = Math.asin(g[2] / G)
  const rm = Math.hypot(...moon)
  const am = Math.atan2(moon[1], moon[0])
  const dm = Math.asin(moon[2] / rm)
  const x = rm * Math.cos(dm) * Math.sin(am - a)
  const y = rm * (Math.sin(dm) * Math.cos(d) - Math.cos(dm) * Math.sin(d) * Math.cos(am - a))
  const z = rm * (Math.sin(dm) * Math.sin(d) + Math.cos(dm) * Math.cos(d) * Math.cos(am - a))
  const sinF1 = (SUN_RADIUS_ER + K_PENUMBRA) / G
  const sinF2 = (SUN_RADIUS_ER - K_UMBRA) / G
  const tanF1 = Math.tan(Math.asin(sinF1))
  const tanF2 = Math.tan(Math.asin(sinF2))
  const l1 = z * tanF1 + K_PENUMBRA / Math.cos(Math.asin(sinF1))
  const l2 = z * tanF2 - K_UMBRA / Math.cos(Math.asin(sinF2))
  let mu = gastDegAtTdt(jde) - (a * 180) / Math.PI
  mu = ((mu % 360) + 360) % 360
  return { t, x, y, dDeg: (d * 180) / Math.PI, muDeg: mu, l1, l2, tanF1, tanF2, moonDistanceKm: m.distanceKm }
}

/** Least-squares polynomial fit of the given degree (normal equations; small, well-conditioned in t). */
export function polyFit(ts: number[], vs: number[], degree: number): number[] {
  const n = degree + 1
  const A: number[][] = Array.from({ length: n }, () => new Array(n + 1).fill(0))
  for (let k = 0; k < ts.length; k++) {
    const pw = Array.from({ length: 2 * n }, (_, i) => ts[k]! ** i)
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) A[i]![j]! += pw[i + j]!
      A[i]![n]! += pw[i]! * vs[k]!
    }
  }
  for (let i = 0; i < n; i++) {
    let p = i
    for (let r = i + 1; r < n; r++) if (Math.abs(A[r]![i]!) > Math.abs(A[p]![i]!)) p = r
    ;[A[i], A[p]] = [A[p]!, A[i]!]
    for (let r = 0; r < n; r++) {
      if (r === i) continue
      const f = A[r]![i]! / A[i]![i]!
      for (let c = i; c <= n; c++) A[r]![c]! -= f * A[i]![c]!
    }
  }
  return A.map((row, i) => row[n]! / row[i]!)
}

/**
 * Computes a Besselian element set about t0, the whole TDT hour nearest `greatestTt`
 * (days since J2000, TT). x, y cubic; d, μ, l1, l2 quadratic; tan f1, tan f2 constant;
 * fitted over t0 ± ELEMENT_WINDOW_H hours at 10-minute steps.
 */
export function computeElements(greatestTtDays: number, deltaTSec?: number): BesselianElements {
  const ttMs = J2000_UNIX_MS + greatestTtDays * 86_400_000
  const t0Ms = Math.round(ttMs / 3_600_000) * 3_600_000
  // Like the Canon: the set is dated by greatest eclipse (TDT), so t0 may be 24 h.
  const day = new Date(Math.floor(ttMs / 86_400_000) * 86_400_000)
  const t0Tdt = (t0Ms - day.getTime()) / 3_600_000
  const t0Days = (t0Ms - J2000_UNIX_MS) / 86_400_000
  const samples: ElementSample[] = []
  let distanceKm: number | undefined
  for (let t = -ELEMENT_WINDOW_H; t <= ELEMENT_WINDOW_H + 1e-9; t += 1 / 6) {
    const s = elementSample(t0Days + t / 24, t, distanceKm)
    distanceKm = s.moonDistanceKm
    samples.push(s)
  }
  const ts = samples.map((s) => s.t)
  // Unwrap μ, which passes through 360°.
  const mus: number[] = []
  for (const s of samples) {
    let m = s.muDeg
    if (mus.length) { while (m - mus[mus.length - 1]! < -180) m += 360; while (m - mus[mus.length - 1]! > 180) m -= 360 }
    mus.push(m)
  }
  const mean = (k: 'tanF1' | 'tanF2') => samples.reduce((s, v) => s + v[k], 0) / samples.length
  const mu = polyFit(ts, mus, 2)
  mu[0] = ((mu[0]! % 360) + 360) % 360
  const dT = deltaTSec ?? deltaTAt(t0Ms - 69_000).deltaTSec
  return {
    date: day.toISOString().slice(0, 10),
    t0Tdt,
    deltaTSec: Math.round(dT * 10) / 10,
    x: polyFit(ts, samples.map((s) => s.x), 3),
    y: polyFit(ts, samples.map((s) => s.y), 3),
    d: polyFit(ts, samples.map((s) => s.dDeg), 2),
    mu,
    l1: polyFit(ts, samples.map((s) => s.l1), 2),
    l2: polyFit(ts, samples.map((s) => s.l2), 2),
    tanF1: mean('tanF1'),
    tanF2: mean('tanF2'),
    source: COMPUTED_SOURCE,
    kind: 'computed',
  }
}
