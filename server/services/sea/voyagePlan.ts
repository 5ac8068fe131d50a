import { localCircumstances } from '../../../shared/eclipse/local'
import { courseTrack, movingLocalCircumstances } from '../../../shared/eclipse/moving'
import { centralPathRing, centralPathRows } from '../../../shared/eclipse/pathBand'
import { tToUtcMs } from '../../../shared/eclipse/time'
import type { BesselianElements } from '../../../shared/eclipse/types'
import { haversineKm } from '../../../shared/geo/distance'
import type { VoyageCreate } from '../../../shared/schemas/voyages'
import {
  buildWaterGrid, COASTAL_MARGIN_KM, distancesFrom, isOpen, nearestOpenNode, nodeLat, nodeLon, routeKm, routeTo, type WaterGrid,
} from './waterGrid'

/**
 * Planning a voyage that intercepts the central path at sea.
 *
 * 1. The central path's sea points on a 0.1° grid (0.05° water grid underneath; coarser only for very
 *    long reaches, and then said in `gridStepDeg`).
 * 2. One Dijkstra search over open water from the departure gives the shortest water distance to
 *    every point; a point is reachable when, leaving at the stated time and speed, the ship arrives
 *    ARRIVAL_MARGIN_MIN before C1 there.
 * 3. Each reachable point with the Sun at least `minSunAltitudeDeg` high at maximum is scored by
 *    expected seen seconds, duration × P(clear) from the workspace's climatology (duration alone when
 *    there is none, and the result says so). The intercept is the best; alternatives are the next
 *    best at least ALTERNATIVE_SEPARATION_KM from it and from each other.
 * Durations are the local circumstances at sea level at the point (shared/eclipse/local.ts).
 */
export const ARRIVAL_MARGIN_MIN = 30
export const ALTERNATIVE_SEPARATION_KM = 50
export const CANDIDATE_STEP_DEG = 0.1
export const DEFAULT_MIN_SUN_ALTITUDE_DEG = 10
/** Farthest a departure may lie from open water (a harbour's approach), km. */
export const DEPARTURE_SNAP_KM = 30
const KM_PER_NM = 1.852
const MAX_GRID_NODES = 600_000

export interface VoyageContext {
  el: BesselianElements
  deltaTSec: number
  ttMinusClockSec: number
  /** P(clear) for the eclipse month at a point, or null without climatology. */
  pClear: ((lat: number, lon: number) => number | null) | null
}

export class VoyageUnreachable extends Error {
  constructor(readonly reason: string, message: string) { super(message) }
}

interface Candidate {
  lat: number; lon: number; i: number; j: number; km: number
  durationSec: number; pClear: number | null; expectedSec: number; sunAltitudeDeg: number
  c1Ms: number; maxMs: number; c2Ms: number | null; c3Ms: number | null; c4Ms: number | null
  departByMs: number
}

const r1 = (v: number) => Math.round(v * 10) / 10
const r4 = (v: number) => Math.round(v * 1e4) / 1e4
const iso = (ms: number) => new Date(ms).toISOString()
const wrapLon = (lon: number) => ((((lon + 180) % 360) + 360) % 360) - 180

export type VoyageInput = Pick<VoyageCreate, 'departure' | 'speedKn' | 'minSunAltitudeDeg' | 'returnTo' | 'holdCourse'>

export function planVoyage(input: VoyageInput, ctx: VoyageContext) {
  const { el, deltaTSec, ttMinusClockSec } = ctx
  const dep = input.departure
  const depMs = Date.parse(dep.utc)
  const kmPerHour = input.speedKn * KM_PER_NM
  const minAlt = input.minSunAltitudeDeg ?? DEFAULT_MIN_SUN_ALTITUDE_DEG
  const ring = centralPathRing(el, deltaTSec, ttMinusClockSec)
  if (!ring) throw new VoyageUnreachable('no_central_path', 'This eclipse has no central path to intercept.')
  // The farthest the ship can go before the last moment of the element window (3 hours after t0).
  const endMs = tToUtcMs(el, 3, ttMinusClockSec)
  const reachKm = Math.max(0, ((endMs - depMs) / 3_600_000) * kmPerHour)
  if (reachKm <= 0) throw new VoyageUnreachable('too_late', 'The departure is after the eclipse.')
  const rows = centralPathRows(ring, CANDIDATE_STEP_DEG, 0)
  const reachLat = reachKm / 111.2
  const reachLon = reachKm / (111.2 * Math.max(0.05, Math.cos((dep.lat * Math.PI) / 180)))
  const inReach: Array<[number, number]> = []
  for (const row of rows) {
    if (Math.abs(row.latDeg - dep.lat) > reachLat) continue
    for (const [a, b] of row.intervals) {
      for (let k = Math.ceil(a / CANDIDATE_STEP_DEG); k * CANDIDATE_STEP_DEG <= b; k++) {
        const lon = wrapLon(k * CANDIDATE_STEP_DEG)
        if (Math.abs(wrapLon(lon - dep.lon)) <= reachLon && haversineKm(dep.lat, dep.lon, row.latDeg, lon) <= reachKm) inReach.push([row.latDeg, lon])
      }
    }
  }
  if (!inReach.length) throw new VoyageUnreachable('too_far', `No part of the central path lies within ${Math.round(reachKm / KM_PER_NM)} nm of the departure at ${input.speedKn} kn before the eclipse ends.`)
  // The region: the departure and the path points in reach, with room for detours around land.
  const lats = [dep.lat, ...inReach.map((p) => p[0])]
  const lons = [dep.lon, ...inReach.map((p) => p[1])]
  const pad = 2
  const box = { south: Math.min(...lats) - pad, north: Math.max(...lats) + pad, west: Math.min(...lons) - pad, east: Math.max(...lons) + pad }
  let stepDeg = 0.05
  while (((box.north - box.south) / stepDeg) * ((box.east - box.west) / stepDeg) > MAX_GRID_NODES) stepDeg *= 2
  const grid = buildWaterGrid(box, stepDeg)
  const start = nearestOpenNode(grid, dep.lat, dep.lon, DEPARTURE_SNAP_KM)
  if (!start) throw new VoyageUnreachable('departure_not_at_sea', `The departure is more than ${DEPARTURE_SNAP_KM} km from open water (${COASTAL_MARGIN_KM} km off the coast).`)
  const { km, prev } = distancesFrom(grid, start)

  const candStep = Math.max(CANDIDATE_STEP_DEG, stepDeg)
  const seen = new Set<string>()
  let atSea = 0, inTime = 0
  const cands: Candidate[] = []
  for (const [latIn, lonIn] of inReach) {
    const lat = Math.round(latIn / candStep) * candStep
    const lon = Math.round(lonIn / candStep) * candStep
    const key = `${lat.toFixed(2)},${lon.toFixed(2)}`
    if (seen.has(key)) continue
    seen.add(key)
    const i = Math.round((lat - grid.south) / stepDeg), j = Math.round((lon - grid.west) / stepDeg)
    if (!isOpen(grid, i, j)) continue
    atSea++
    const d = km[i * grid.cols + j]! + start.km
    if (!Number.isFinite(d)) continue
    const lc = localCircumstances(el, { latDeg: r4(lat), lonDeg: r4(lon), elevationM: 0 }, deltaTSec, ttMinusClockSec)
    if ((lc.type !== 'total' && lc.type !== 'annular') || !lc.c1 || !lc.max || !lc.c2 || !lc.c3) continue
    const departByMs = lc.c1.utcMs - ARRIVAL_MARGIN_MIN * 60_000 - (d / kmPerHour) * 3_600_000
    if (departByMs < depMs) continue
    inTime++
    const alt = lc.max.apparentAltitudeDeg
    if (alt < minAlt) continue
    const durationSec = r1(lc.durationSec)
    const pClear = ctx.pClear ? ctx.pClear(lat, lon) : null
    cands.push({
      lat: r4(lat), lon: r4(lon), i, j, km: d, durationSec, pClear, expectedSec: pClear === null ? durationSec : durationSec * pClear,
      sunAltitudeDeg: r1(alt), c1Ms: lc.c1.utcMs, maxMs: lc.max.utcMs, c2Ms: lc.c2.utcMs, c3Ms: lc.c3.utcMs, c4Ms: lc.c4?.utcMs ?? null, departByMs,
    })
  }
  if (!cands.length) {
    const reason = atSea === 0 ? 'no_sea' : inTime === 0 ? 'too_far' : 'sun_too_low'
    const message = atSea === 0 ? 'No point of the central path within reach is at sea.'
      : inTime === 0 ? `No sea point of the central path can be reached ${ARRIVAL_MARGIN_MIN} minutes before C1 at ${input.speedKn} kn.`
        : `Every sea point reachable in time has the Sun lower than ${minAlt}° at maximum.`
    throw new VoyageUnreachable(reason, message)
  }
  // Best first; among equals the nearer one.
  cands.sort((a, b) => b.expectedSec - a.expectedSec || a.km - b.km)
  const best = cands[0]!
  const picked: Candidate[] = [best]
  for (const c of cands) {
    if (picked.length >= 4) break
    if (picked.every((p) => haversineKm(p.lat, p.lon, c.lat, c.lon) >= ALTERNATIVE_SEPARATION_KM)) picked.push(c)
  }
  const legs = (c: Candidate) => {
    const nodes = routeTo(grid, prev, { i: c.i, j: c.j })!
    const line: Array<[number, number]> = start.km > 0 ? [[dep.lon, dep.lat], ...nodes] : nodes
    const distKm = routeKm(line)
    // The straightened route is never longer than the grid route the reach was judged on.
    const departByMs = c.c1Ms - ARRIVAL_MARGIN_MIN * 60_000 - (distKm / kmPerHour) * 3_600_000
    return { line, distKm, departByMs }
  }
  const summary = (c: Candidate) => {
    const l = legs(c)
    return {
      lat: c.lat, lon: c.lon, utc: iso(c.maxMs), durationSec: c.durationSec, pClear: c.pClear,
      expectedSec: r1(c.expectedSec), sunAltitudeDeg: c.sunAltitudeDeg,
      contacts: { c1: iso(c.c1Ms), c2: c.c2Ms ? iso(c.c2Ms) : null, max: iso(c.maxMs), c3: c.c3Ms ? iso(c.c3Ms) : null, c4: c.c4Ms ? iso(c.c4Ms) : null },
      distanceNm: r1(l.distKm / KM_PER_NM), departBy: iso(l.departByMs),
      route: { type: 'LineString' as const, coordinates: l.line.map(([x, y]) => [r4(x), r4(y)]) },
      _distKm: l.distKm,
    }
  }
  const main = summary(best)
  const { route, distanceNm, departBy, _distKm, ...intercept } = main
  // Where the ship is at each whole hour after departure, at the stated speed, until it arrives.
  const hourly: Array<{ utc: string; lat: number; lon: number }> = []
  for (let h = 1; h * kmPerHour < _distKm; h++) {
    const p = pointAlong(route.coordinates as Array<[number, number]>, h * kmPerHour)
    hourly.push({ utc: iso(depMs + h * 3_600_000), lat: r4(p[1]), lon: r4(p[0]) })
  }
  let homeward: { route: { type: 'LineString'; coordinates: number[][] }; distanceNm: number } | null = null
  if (input.returnTo) {
    const from = distancesFrom(grid, { i: best.i, j: best.j })
    const end = nearestOpenNode(grid, input.returnTo.lat, input.returnTo.lon, DEPARTURE_SNAP_KM)
    if (end && Number.isFinite(from.km[end.i * grid.cols + end.j]!)) {
      const nodes = routeTo(grid, from.prev, end)!
      const line: Array<[number, number]> = end.km > 0 ? [...nodes, [input.returnTo.lon, input.returnTo.lat]] : nodes
      homeward = { route: { type: 'LineString', coordinates: line.map(([x, y]) => [r4(x), r4(y)]) }, distanceNm: r1(routeKm(line) / KM_PER_NM) }
    }
  }
  let underway = null
  if (input.holdCourse) {
    const m = movingLocalCircumstances(el, courseTrack({ latDeg: best.lat, lonDeg: best.lon, elevationM: 0 }, best.maxMs, input.holdCourse.headingDeg, input.holdCourse.speedKn),
      deltaTSec, ttMinusClockSec, best.maxMs)
    underway = {
      headingDeg: input.holdCourse.headingDeg, speedKn: input.holdCourse.speedKn, durationSec: r1(m.durationSec), gainSec: r1(m.durationSec - best.durationSec),
      contacts: Object.fromEntries((['c1', 'c2', 'max', 'c3', 'c4'] as const).map((k) => [k, m[k] ? { utc: iso(m[k]!.utcMs), lat: r4(m[k]!.latDeg), lon: r4(m[k]!.lonDeg), sunAltitudeDeg: r1(m[k]!.apparentAltitudeDeg) } : null])),
    }
  }
  return {
    intercept, route, distanceNm, departBy,
    alternatives: picked.slice(1).map((c) => { const { _distKm: _, ...s } = summary(c); return s }),
    hourly, homeward, underway,
    method: {
      gridStepDeg: stepDeg, candidateStepDeg: candStep, coastalMarginKm: COASTAL_MARGIN_KM, arrivalMarginMin: ARRIVAL_MARGIN_MIN,
      minSunAltitudeDeg: minAlt, climatology: ctx.pClear ? 'expected seconds = duration × P(clear) for the eclipse month' : 'no climatology chosen: ranked by duration alone',
      land: 'Natural Earth 1:10m land; routes keep the coastal margin and do not cross the antimeridian',
    },
  }
}

/** The point `km` along a [lon, lat] polyline (linear within each leg, which is short). */
function pointAlong(line: Array<[number, number]>, km: number): [number, number] {
  let left = km
  for (let k = 1; k < line.length; k++) {
    const [x0, y0] = line[k - 1]!, [x1, y1] = line[k]!
    const leg = haversineKm(y0, x0, y1, x1)
    if (left <= leg && leg > 0) { const f = left / leg; return [x0 + f * (x1 - x0), y0 + f * (y1 - y0)] }
    left -= leg
  }
  return line[line.length - 1]!
}

export type VoyagePlan = ReturnType<typeof planVoyage>
export type { WaterGrid }
export { nodeLat, nodeLon }
