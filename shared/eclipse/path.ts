import { deltaTHourAngleRad, elementsAt, groundPoint, observerOf, sunAltAz } from './besselian'
import { EARTH_E2 } from './constants'
import { inverse } from './geodesy'
import { centrelineBearing, localCircumstances } from './local'
import { centrePoint, offsetPoint, type GroundPoint } from './shadow'
import { isoTenths, tToUtcMs, utcMsToT } from './time'
import type { BesselianElements } from './types'

type Position = [number, number]
export interface Feature<G = unknown, P = Record<string, unknown>> { type: 'Feature'; geometry: G; properties: P }
export interface FeatureCollection { type: 'FeatureCollection'; features: Feature[]; properties?: Record<string, unknown> }

/** Window (hours about t0) over which element sets are fitted and searched. */
export const ELEMENT_WINDOW_H = 4

/** Intervals of t (hours) where `exists(t)` is true, found on a coarse grid then bisected to 1 ms. */
export function existenceIntervals(exists: (t: number) => boolean, from = -ELEMENT_WINDOW_H, to = ELEMENT_WINDOW_H,
  coarseH = 1 / 60): Array<[number, number]> {
  const out: Array<[number, number]> = []
  const refine = (lo: number, hi: number, loIn: boolean) => {
    // invariant: exists(lo) === loIn, exists(hi) === !loIn
    for (let i = 0; i < 40 && hi - lo > 1e-7; i++) {
      const mid = (lo + hi) / 2
      if (exists(mid) === loIn) lo = mid
      else hi = mid
    }
    return loIn ? lo : hi
  }
  let prevT = from
  let prevIn = exists(from)
  let start: number | null = prevIn ? from : null
  for (let t = from + coarseH; t <= to + 1e-12; t += coarseH) {
    const inside = exists(t)
    if (inside && !prevIn) start = refine(prevT, t, false)
    if (!inside && prevIn && start !== null) out.push([start, refine(prevT, t, true)])
    prevT = t
    prevIn = inside
  }
  if (prevIn && start !== null) out.push([start, to])
  return out
}

/** t values inside [a, b] at whole multiples of stepSec of UTC, plus both ends. */
function sampleTimes(el: BesselianElements, a: number, b: number, stepSec: number, ttMinusClockSec: number): number[] {
  const ua = tToUtcMs(el, a, ttMinusClockSec)
  const ub = tToUtcMs(el, b, ttMinusClockSec)
  const stepMs = stepSec * 1000
  const ts = [a]
  for (let u = Math.ceil(ua / stepMs) * stepMs; u < ub; u += stepMs) {
    const t = utcMsToT(el, u, ttMinusClockSec)
    if (t > a + 1e-9) ts.push(t)
  }
  ts.push(b)
  return ts
}

function isWholeStep(el: BesselianElements, t: number, stepSec: number, ttMinusClockSec: number): boolean {
  const u = tToUtcMs(el, t, ttMinusClockSec)
  return Math.abs(u / (stepSec * 1000) - Math.round(u / (stepSec * 1000))) < 1e-6
}

/** Makes longitudes continuous along a line (may leave −180..180), for drawing across the antimeridian. */
export function unwrap(coords: Position[]): Position[] {
  const out: Position[] = []
  let offset = 0
  for (let i = 0; i < coords.length; i++) {
    const [lon, lat] = coords[i]!
    if (i > 0) {
      const prev = coords[i - 1]![0]
      const d = lon - prev
      if (d > 180) offset -= 360
      else if (d < -180) offset += 360
    }
    out.push([lon + offset, lat])
  }
  return out
}

/** Splits a line at the antimeridian, as RFC 7946 §3.1.9 asks. Input longitudes in −180..180. */
export function splitAtAntimeridian(coords: Position[]): Position[][] {
  const parts: Position[][] = [[]]
  for (let i = 0; i < coords.length; i++) {
    const p = coords[i]!
    if (i > 0) {
      const q = coords[i - 1]!
      if (Math.abs(p[0] - q[0]) > 180) {
        const east = q[0] > 0 ? 180 : -180
        const pLon = p[0] + (q[0] > 0 ? 360 : -360)
        const frac = (east - q[0]) / (pLon - q[0])
        const lat = q[1] + frac * (p[1] - q[1])
        parts[parts.length - 1]!.push([east, lat])
        parts.push([[-east, lat]])
      }
    }
    parts[parts.length - 1]!.push(p)
  }
  return parts.filter((l) => l.length >= 2)
}

function lineFeature(lines: Position[][], properties: Record<string, unknown>, wrap: 'split' | 'unwrap'): Feature | null {
  const parts = lines.flatMap((l) => (wrap === 'split' ? splitAtAntimeridian(l) : [unwrap(l)])).filter((l) => l.length >= 2)
  if (parts.length === 0) return null
  return parts.length === 1
    ? { type: 'Feature', geometry: { type: 'LineString', coordinates: parts[0] }, properties }
    : { type: 'Feature', geometry: { type: 'MultiLineString', coordinates: parts }, properties }
}

const r6 = (v: number) => Math.round(v * 1e6) / 1e6
const pos = (g: { latDeg: number; lonDeg: number }): Position => [r6(g.lonDeg), r6(g.latDeg)]

export interface PathOptions {
  /** Tick spacing in seconds of UTC (default 60). */
  stepSec?: number
  /** ΔT in seconds (default: the set's own). */
  deltaTSec?: number
  /** TT minus the clock, seconds: TT − UTC for UTC ticks (timeScales.ts); default ΔT, i.e. UT1. */
  ttMinusClockSec?: number
  /** Fractions of the centreline duration for the equal-duration lines. */
  durationFractions?: number[]
  /** 'split' (RFC 7946, default) or 'unwrap' (continuous longitudes, for map drawing). */
  antimeridian?: 'split' | 'unwrap'
}

/**
 * The whole path of an eclipse as a GeoJSON FeatureCollection: centreline, limits of the
 * umbral/antumbral path, penumbral limits, sunrise/sunset ends, equal-duration lines and
 * Point ticks at whole multiples of stepSec of UTC.
 */
export function eclipsePath(el: BesselianElements, opts: PathOptions = {}): FeatureCollection {
  const stepSec = opts.stepSec ?? 60
  const deltaTSec = opts.deltaTSec ?? el.deltaTSec
  const wrap = opts.antimeridian ?? 'split'
  const fractions = opts.durationFractions ?? [0.25, 0.5, 0.75]
  const clock = opts.ttMinusClockSec ?? deltaTSec
  const dH = deltaTHourAngleRad(deltaTSec)
  const features: Feature[] = []
  const utcOf = (t: number) => isoTenths(tToUtcMs(el, t, clock))

  const traceLine = (pointAt: (t: number) => GroundPoint | null) => {
    const intervals = existenceIntervals((t) => pointAt(t) !== null)
    return intervals.map(([a, b]) => {
      const pts: Array<{ t: number; g: GroundPoint }> = []
      for (const t of sampleTimes(el, a, b, stepSec, clock)) {
        const g = pointAt(t)
        if (g) pts.push({ t, g })
      }
      return pts
    })
  }

  const centre = traceLine((t) => centrePoint(el, t, dH))
  const north = traceLine((t) => offsetPoint(el, t, 1, 'umbra', dH))
  const south = traceLine((t) => offsetPoint(el, t, -1, 'umbra', dH))
  const penNorth = traceLine((t) => offsetPoint(el, t, 1, 'penumbra', dH))
  const penSouth = traceLine((t) => offsetPoint(el, t, -1, 'penumbra', dH))

  const add = (f: Feature | null) => { if (f) features.push(f) }
  const asLines = (segs: Array<Array<{ g: GroundPoint }>>) => segs.map((s) => s.map((p) => pos(p.g)))
  add(lineFeature(asLines(centre), { kind: 'centreline', line: 'centre' }, wrap))
  add(lineFeature(asLines(north), { kind: 'limit', line: 'north' }, wrap))
  add(lineFeature(asLines(south), { kind: 'limit', line: 'south' }, wrap))
  add(lineFeature(asLines(penNorth), { kind: 'penumbral-limit', line: 'north' }, wrap))
  add(lineFeature(asLines(penSouth), { kind: 'penumbral-limit', line: 'south' }, wrap))

  // Sunrise and sunset ends of the central path: for offsets across the path, the first and
  // last instants at which that offset point is on the Earth (maximum at the horizon).
  if (centre.length > 0) {
    const offsets = Array.from({ length: 17 }, (_, i) => -1 + i / 8)
    const ends: Record<'sunrise' | 'sunset', Position[]> = { sunrise: [], sunset: [] }
    // The ends of every offset line lie within half an hour of the centreline's own ends.
    const tFirst = centre[0]![0]!.t
    const lastSeg = centre[centre.length - 1]!
    const tLast = lastSeg[lastSeg.length - 1]!.t
    const near = (t: number) => [Math.max(-ELEMENT_WINDOW_H, t - 0.5), Math.min(ELEMENT_WINDOW_H, t + 0.5)] as const
    for (const s of offsets) {
      const exists = (t: number) => offsetPoint(el, t, s, 'umbra', dH) !== null
      const iv = [...existenceIntervals(exists, ...near(tFirst), 1 / 30), ...existenceIntervals(exists, ...near(tLast), 1 / 30)]
      if (iv.length === 0) continue
      const first = offsetPoint(el, iv[0]![0], s, 'umbra', dH)
      const last = offsetPoint(el, iv[iv.length - 1]![1], s, 'umbra', dH)
      if (first) ends.sunrise.push(pos(first))
      if (last) ends.sunset.push(pos(last))
    }
    add(lineFeature([ends.sunrise], { kind: 'path-end', line: 'sunrise' }, wrap))
    add(lineFeature([ends.sunset], { kind: 'path-end', line: 'sunset' }, wrap))
  }

  // Ticks and equal-duration lines.
  const centreDur = new Map<number, number>()
  for (const seg of centre) {
    for (const p of seg) {
      const lc = localCircumstances(el, { latDeg: p.g.latDeg, lonDeg: p.g.lonDeg }, deltaTSec)
      centreDur.set(p.t, lc.durationSec)
    }
  }
  // Path width at each whole-step instant, measured once at the centreline and shared by that instant's limit ticks.
  // The limit points and the track direction come from the lines already traced at the same instants.
  const widthByT = new Map<string, number>()
  const limitAt = (segs: typeof north) => new Map(segs.flat().filter((p) => isWholeStep(el, p.t, stepSec, clock)).map((p) => [utcOf(p.t), p.g] as const))
  const northAt = limitAt(north)
  const southAt = limitAt(south)
  const tickLines: Array<['centre' | 'north' | 'south', typeof centre]> = [['centre', centre], ['north', north], ['south', south]]
  for (const [line, segs] of tickLines) {
    for (const seg of segs) {
      for (const p of seg) {
        if (!isWholeStep(el, p.t, stepSec, clock)) continue
        const st = elementsAt(el, p.t)
        const o = observerOf({ latDeg: p.g.latDeg, lonDeg: p.g.lonDeg })
        const H = st.mu + o.lonRad - dH
        const props: Record<string, unknown> = {
          kind: 'tick', line, utc: utcOf(p.t),
          sunAltitudeDeg: Math.round(sunAltAz(st, o, H).altitudeDeg * 10) / 10,
        }
        if (line === 'centre') {
          props.durationSec = Math.round((centreDur.get(p.t) ?? 0) * 10) / 10
          const key = props.utc as string
          const w = widthAt(el, p.t, p.g, dH, northAt.get(key), southAt.get(key))
          if (w !== null) widthByT.set(props.utc as string, Math.round(w * 10) / 10)
        }
        const w = widthByT.get(props.utc as string)
        if (w !== undefined) props.pathWidthKm = w
        features.push({ type: 'Feature', geometry: { type: 'Point', coordinates: pos(p.g) }, properties: props })
      }
    }
  }

  // Equal-duration lines are smooth: trace them on a whole-minute grid (or the tick step, if coarser).
  const durStepSec = Math.max(60, stepSec)
  const durTimes = centre.map((seg) => seg.filter((p, i) => i === 0 || i === seg.length - 1 || isWholeStep(el, p.t, durStepSec, clock)))
  for (const r of fractions) {
    for (const side of [1, -1] as const) {
      const lines: Position[][] = []
      for (const seg of durTimes) {
        let cur: Position[] = []
        for (const p of seg) {
          const D0 = centreDur.get(p.t) ?? 0
          const g = D0 > 0 ? durationOffsetPoint(el, p.t, r, side, D0, deltaTSec, dH) : null
          if (g) cur.push(pos(g))
          else if (cur.length) { lines.push(cur); cur = [] }
        }
        if (cur.length) lines.push(cur)
      }
      add(lineFeature(lines, { kind: 'duration', fraction: r, line: side > 0 ? 'north' : 'south' }, wrap))
    }
  }

  return {
    type: 'FeatureCollection',
    features,
    properties: { elementsSource: el.source, deltaTSec, ttMinusClockSec: clock, stepSec },
  }
}

/** Point across the path at time t whose central duration is `ratio` × the centreline's (Newton on the offset). */
function durationOffsetPoint(el: BesselianElements, t: number, ratio: number, side: 1 | -1, D0: number,
  deltaTSec: number, dH: number): GroundPoint | null {
  let s = Math.sqrt(1 - ratio * ratio) // first guess: D ≈ D0·√(1 − s²)
  let g: GroundPoint | null = null
  for (let i = 0; i < 3; i++) {
    g = offsetPoint(el, t, side * s, 'umbra', dH)
    if (!g) return null
    const D = localCircumstances(el, { latDeg: g.latDeg, lonDeg: g.lonDeg }, deltaTSec).durationSec
    const err = D / D0 - ratio
    if (Math.abs(err) < 1e-3) break // 0.1 % of the duration: finer than the line can be drawn
    const slope = -s / Math.sqrt(Math.max(1e-6, 1 - s * s))
    s = Math.min(0.999, Math.max(0.001, s - err / slope))
  }
  return g
}

/**
 * Path width (km) at time t from the limit points at the same instant, measured
 * perpendicular to the centreline (the limits run parallel to it locally).
 */
function widthAt(el: BesselianElements, t: number, c: GroundPoint, dH: number, north?: GroundPoint, south?: GroundPoint): number | null {
  const track = centrelineBearing(el, t, dH)
  const n = north ?? offsetPoint(el, t, 1, 'umbra', dH)
  const s = south ?? offsetPoint(el, t, -1, 'umbra', dH)
  if (track === null || !n || !s) return null
  const part = (p: GroundPoint) => {
    const inv = inverse(c.latDeg, c.lonDeg, p.latDeg, p.lonDeg)
    return inv.distanceKm * Math.abs(Math.sin(((inv.bearingDeg - track) * Math.PI) / 180))
  }
  return part(n) + part(s)
}

/**
 * Outline on the ground of the umbra or penumbra at one instant (hours after t0), as a
 * GeoJSON Polygon with continuous longitudes; null when that shadow misses the Earth.
 * The region is the shadow circle on the fundamental plane cut by the Earth's disc.
 */
export function shadowOutline(el: BesselianElements, t: number, cone: 'umbra' | 'penumbra', deltaTSec = el.deltaTSec,
  points = 72, ttMinusClockSec = deltaTSec): Feature | null {
  const st = elementsAt(el, t)
  const dH = deltaTHourAngleRad(deltaTSec)
  const tanF = cone === 'umbra' ? el.tanF2 : el.tanF1
  const l = cone === 'umbra' ? st.l2 : st.l1
  const plane: Array<[number, number]> = []
  for (let i = 0; i < points; i++) {
    const th = (2 * Math.PI * i) / points
    let zeta = 0
    let xi = 0, eta = 0, ok = false
    for (let k = 0; k < 6; k++) {
      const L = Math.abs(l - zeta * tanF)
      xi = st.x + L * Math.sin(th)
      eta = st.y + L * Math.cos(th)
      const g = groundPoint(st, xi, eta, dH)
      if (!g) { ok = false; break }
      ok = true
      zeta = g.zeta
    }
    if (ok) plane.push([xi, eta])
  }
  // The Earth's limb (ζ = 0) on the fundamental plane, where it lies inside the shadow circle.
  const q = 1 / (1 - EARTH_E2)
  const etaMax = 1 / Math.sqrt(st.sinD ** 2 + q * st.cosD ** 2)
  const Llimb = Math.abs(l)
  for (let i = 0; i < 360; i++) {
    const ps = (2 * Math.PI * i) / 360
    const xi = Math.cos(ps) * (1 - 1e-9)
    const eta = Math.sin(ps) * etaMax * (1 - 1e-9)
    if (Math.hypot(xi - st.x, eta - st.y) < Llimb) plane.push([xi, eta])
  }
  if (plane.length < 3) return null
  const cx = plane.reduce((s, p) => s + p[0], 0) / plane.length
  const cy = plane.reduce((s, p) => s + p[1], 0) / plane.length
  plane.sort((p, r) => Math.atan2(p[1] - cy, p[0] - cx) - Math.atan2(r[1] - cy, r[0] - cx))
  const ring: Position[] = []
  for (const [xi, eta] of plane) {
    const g = groundPoint(st, xi, eta, dH)
    if (g) ring.push(pos(g))
  }
  if (ring.length < 3) return null
  const closed = unwrap([...ring, ring[0]!])
  return {
    type: 'Feature',
    geometry: { type: 'Polygon', coordinates: [closed] },
    properties: { kind: cone, utc: isoTenths(tToUtcMs(el, t, ttMinusClockSec)) },
  }
}
