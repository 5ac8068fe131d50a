import type { Kysely } from 'kysely'
import { performance } from 'node:perf_hooks'
import { centralDurationEvaluator } from '../../shared/eclipse/centralDuration'
import { localCircumstances } from '../../shared/eclipse/local'
import { haversineKm } from '../../shared/geo/distance'
import { BEST_SPOT_TIE_SEC, type BestSpotsInput } from '../../shared/schemas/bestGround'
import type { Database } from '../database/schema'
import { resolveTimeBasis, timeBasisOut } from '../eclipse/report'
import { expectedSeenGrid, SURFACE_MARGIN_KM, SURFACE_STEP_DEG, surfaceBands, wrapLon } from '../eclipse/surface'
import { cloudAt, eclipseMonth, pClearSampler, workspaceGrids } from './climatology'
import { elementsInForce } from './eclipses'
import { isLand } from './land'
import { getWorkspace } from './planning'
import { terrainFor } from './terrain'
import { nowIso, nowMs } from './clock'
import { searchGrid } from './searchGrid'

const r1 = (v: number) => Math.round(v * 10) / 10
const r4 = (v: number) => Math.round(v * 1e4) / 1e4
/** What the surface, the hover read-out and the search all need about a workspace. */
async function groundContext(db: Kysely<Database>, workspaceId: number) {
  const ws = await getWorkspace(db, workspaceId)
  const { el, key, deltaTOverride } = await elementsInForce(db, ws.eclipse_id)
  const dt = resolveTimeBasis(el, deltaTOverride)
  const month = eclipseMonth(ws.eclipse_id)
  const grids = await workspaceGrids(db, ws)
  const terrain = await terrainFor(db, workspaceId)
  return { ws, el, elementsKey: key, dt, month, grids, terrain }
}
type GroundContext = Awaited<ReturnType<typeof groundContext>>

function climatologyNote(ctx: GroundContext): string | null {
  if (!ctx.ws.climatology_id) return 'No climatology is chosen for this workspace: the bands show the central duration alone.'
  if (!ctx.grids) return `The chosen climatology has no data for month ${ctx.month}: the bands show the central duration alone.`
  return null
}

/** The figures at one point, by the same evaluation as the local-circumstances route and the site metrics. */
export function spotFigures(ctx: GroundContext, latIn: number, lonIn: number) {
  // Evaluated at the coordinates returned (4 decimals, about 11 m), so a caller who asks the local route there gets the same duration.
  const lat = r4(latIn), lon = r4(lonIn)
  // Whole metres, so the local-circumstances route given the same elevation computes the same figures.
  const elevationM = Math.round(ctx.terrain?.heightAt(lat, lon) ?? 0)
  const lc = localCircumstances(ctx.el, { latDeg: lat, lonDeg: lon, elevationM }, ctx.dt.deltaTSec, ctx.dt.ttMinusClockSec)
  const durationSec = r1(lc.durationSec)
  const pClear = ctx.grids ? cloudAt(ctx.grids, lat, lon).pClear : null
  return {
    lat, lon, elevationM,
    durationSec, pClear, expectedSec: pClear === null ? null : durationSec * pClear,
    sunAltitudeDeg: lc.max ? r1(lc.max.apparentAltitudeDeg) : null,
  }
}

interface CachedSurface { body: ReturnType<typeof buildSurface>; at: number }
const surfaceCache = new Map<string, CachedSurface>()
export const SURFACE_CACHE_MAX = 6

function buildSurface(ctx: GroundContext) {
  const started = performance.now()
  const measure: 'expected' | 'duration' = ctx.grids ? 'expected' : 'duration'
  const grid = expectedSeenGrid(ctx.el, ctx.dt.deltaTSec, ctx.dt.ttMinusClockSec, ctx.grids ? pClearSampler(ctx.grids) : null)
  const bands = grid ? surfaceBands(grid, measure) : null
  const best = bands?.best
  return {
    type: 'FeatureCollection' as const,
    features: bands?.features ?? [],
    properties: {
      eclipseId: ctx.ws.eclipse_id,
      measure,
      unit: 's',
      bandStepSec: bands?.bandStepSec ?? null,
      legend: bands?.legend ?? [],
      best: best ? {
        lat: r4(best.lat), lon: r4(best.lon), durationSec: r1(best.durationSec), pClear: best.pClear === null ? null : Math.round(best.pClear * 1000) / 1000,
        expectedSec: best.expectedSec === null ? null : r1(best.expectedSec), sunAltitudeDeg: r1(best.sunAltitudeDeg),
      } : null,
      grid: { stepDeg: SURFACE_STEP_DEG, stepKmMax: r1(SURFACE_STEP_DEG * 111.2), marginKm: SURFACE_MARGIN_KM, cells: grid?.cells ?? 0 },
      climatology: ctx.grids ? { id: ctx.grids.meta.id, name: ctx.grids.meta.name, demo: !!ctx.grids.meta.demo, month: ctx.month } : null,
      note: grid ? climatologyNote(ctx) : 'This eclipse has no central path.',
      method: 'Central duration from the element set in force (at sea level) × P(clear) from the workspace climatology for the eclipse month; '
        + 'cells where the Sun is below the horizon at maximum, or without cloud data, are left out.',
      time: timeBasisOut(ctx.dt, ctx.el),
      elementsKind: ctx.el.kind,
      computedMs: Math.round(performance.now() - started),
      computedAt: nowIso(),
    },
  }
}

/**
 * The expected-seen surface of a workspace's eclipse as GeoJSON bands. Cached per eclipse, element
 * set, ΔT and climatology (and month): a new published set, a ΔT override or another climatology
 * gives a new key.
 */
export async function expectedSeenSurface(db: Kysely<Database>, workspaceId: number) {
  const ctx = await groundContext(db, workspaceId)
  const key = [ctx.ws.eclipse_id, ctx.elementsKey, ctx.dt.deltaTSec, ctx.ws.climatology_id ?? 'none', ctx.month, ctx.grids?.weights ? `${ctx.grids.weights.scattered}/${ctx.grids.weights.broken}` : '-'].join('|')
  const hit = surfaceCache.get(key)
  if (hit) {
    surfaceCache.delete(key)
    surfaceCache.set(key, hit)
    return { ...hit.body, properties: { ...hit.body.properties, cached: true } }
  }
  const body = buildSurface(ctx)
  if (surfaceCache.size >= SURFACE_CACHE_MAX) surfaceCache.delete(surfaceCache.keys().next().value!)
  surfaceCache.set(key, { body, at: nowMs() })
  return { ...body, properties: { ...body.properties, cached: false } }
}

/** The surface's figures at one point (the map's hover read-out). */
export async function expectedSeenAt(db: Kysely<Database>, workspaceId: number, lat: number, lon: number) {
  const ctx = await groundContext(db, workspaceId)
  return { ...spotFigures(ctx, lat, lon), onLand: isLand(lat, lon) }
}

/**
 * The best ground near a point: a grid of at most SEARCH_GRID_MAX_POINTS points over the disc (spacing
 * radius/100, at least 1 km, wider near a pole; see searchGrid), ranked by expected seen seconds (or duration without a climatology),
 * taken greedily on land and at least `minSeparationKm` apart (default 25 km), each then nudged uphill in its own cell, and
 * finally evaluated exactly as the local-circumstances route does.
 */
export async function bestSpots(db: Kysely<Database>, workspaceId: number, q: BestSpotsInput) {
  const started = performance.now()
  const ctx = await groundContext(db, workspaceId)
  const evaluate = centralDurationEvaluator(ctx.el, ctx.dt.deltaTSec)
  const pAt = ctx.grids ? pClearSampler(ctx.grids) : null
  const scoreAt = (lat: number, lon: number, guess = 0): { score: number; t: number } => {
    const s = evaluate(lat, wrapLon(lon), ctx.terrain?.heightAt(lat, wrapLon(lon)) ?? 0, guess)
    if (!(s.durationSec > 0) || s.sunAltitudeDeg < q.minSunAltitudeDeg) return { score: -1, t: s.tMax }
    if (!pAt) return { score: s.durationSec, t: s.tMax }
    const p = pAt(lat, wrapLon(lon))
    return { score: p === null ? -1 : s.durationSec * p, t: s.tMax }
  }
  const candidates: Array<{ lat: number; lon: number; score: number }> = []
  const grid = searchGrid(q.lat, q.lon, q.radiusKm, Math.max(1, q.radiusKm / 100))
  const stepKm = grid.stepKm
  let guess = 0
  for (const { lat, lon } of grid.points) {
    const s = scoreAt(lat, lon, guess)
    guess = s.t
    if (s.score > 0) candidates.push({ lat, lon, score: s.score })
  }
  const evaluated = candidates.length
  candidates.sort((a, b) => b.score - a.score)
  // 50 m over the asked separation, so the coordinates returned (4 decimals, ±6 m each) still keep it.
  const separationKm = q.minSeparationKm + 0.05
  const farEnough = (lat: number, lon: number, others: Array<{ lat: number; lon: number }>) =>
    others.every((o) => haversineKm(lat, lon, o.lat, o.lon) >= separationKm)
  const picked: Array<{ lat: number; lon: number; score: number }> = []
  let landChecks = 0
  for (const c of candidates) {
    if (picked.length >= q.limit) break
    if (!farEnough(c.lat, c.lon, picked)) continue
    landChecks++
    if (!isLand(c.lat, wrapLon(c.lon))) continue
    picked.push({ ...c })
  }
  // Nudge each spot uphill within its own grid cell (pattern search down to 50 m), staying on land,
  // inside the disc and the asked separation from the others.
  for (const p of picked) {
    const others = picked.filter((o) => o !== p)
    for (let hKm = stepKm / 2; hKm >= 0.05; hKm /= 2) {
      let moved = true
      while (moved) {
        moved = false
        const dl = hKm / 111.2
        const dn = dl / Math.max(0.01, Math.cos((p.lat * Math.PI) / 180))
        for (const [a, b] of [[1, 0], [-1, 0], [0, 1], [0, -1], [1, 1], [1, -1], [-1, 1], [-1, -1]] as const) {
          const lat = p.lat + a * dl, lon = p.lon + b * dn
          const s = scoreAt(lat, lon).score
          if (s <= p.score + 1e-9) continue
          if (haversineKm(q.lat, q.lon, lat, lon) > q.radiusKm || !farEnough(lat, lon, others) || !isLand(lat, wrapLon(lon))) continue
          Object.assign(p, { lat, lon, score: s })
          moved = true
          break
        }
      }
    }
  }
  const found = picked
    .map((p) => ({ ...spotFigures(ctx, p.lat, wrapLon(p.lon)), distanceKm: r1(haversineKm(q.lat, q.lon, p.lat, p.lon)) }))
    .filter((s) => s.durationSec > 0 && s.sunAltitudeDeg !== null && s.sunAltitudeDeg >= q.minSunAltitudeDeg)
  const { data, secondsPer50Km } = rankByDistance(found.map((s) => ({ ...s, elevationFrom: (ctx.terrain?.heightAt(s.lat, s.lon) ?? null) !== null ? 'terrain' as const : null })))
  return {
    data,
    meta: {
      measure: pAt ? 'expected' as const : 'duration' as const,
      radiusKm: q.radiusKm, gridStepKm: r1(stepKm), gridPoints: grid.points.length, separationKm: q.minSeparationKm, tieSec: BEST_SPOT_TIE_SEC, secondsPer50Km, pointsInPath: evaluated, landChecks,
      note: climatologyNote(ctx),
      trade: tradeNote(secondsPer50Km),
      land: 'Natural Earth 1:10m land (public domain): coastlines are good to about 1 km.',
      elevation: ctx.terrain ? `heights from the terrain model "${ctx.terrain.name}" where it covers a spot, else sea level` : 'sea level (no terrain model uploaded)',
      computedMs: Math.round(performance.now() - started),
    },
  }
}

/** The figure a spot is ranked by: expected seen seconds, or the central duration without a climatology. */
const measureOf = (s: { expectedSec: number | null; durationSec: number }) => s.expectedSec ?? s.durationSec

/**
 * Orders spots best first, except that among spots within BEST_SPOT_TIE_SEC of the best one left,
 * the nearest to the search centre comes first. Each spot gets `extraSecPer50Km`: the seconds it
 * gains (or loses) over the nearest spot for each 50 km further it lies (null for the nearest itself,
 * or one no further away); `secondsPer50Km` is that figure for the best spot (0 when the best is
 * the nearest: driving further buys nothing).
 */
export function rankByDistance<T extends { expectedSec: number | null; durationSec: number; distanceKm: number }>(spots: T[]) {
  const rest = [...spots].sort((a, b) => measureOf(b) - measureOf(a) || a.distanceKm - b.distanceKm)
  const ordered: T[] = []
  while (rest.length) {
    const top = measureOf(rest[0]!)
    let pick = 0
    rest.forEach((s, i) => { if (top - measureOf(s) <= BEST_SPOT_TIE_SEC && s.distanceKm < rest[pick]!.distanceKm) pick = i })
    ordered.push(rest.splice(pick, 1)[0]!)
  }
  const nearest = spots.reduce<T | null>((n, s) => (n === null || s.distanceKm < n.distanceKm ? s : n), null)
  const per50 = (s: T) => (nearest === null || s === nearest || s.distanceKm <= nearest.distanceKm
    ? null : r1(((measureOf(s) - measureOf(nearest)) / (s.distanceKm - nearest.distanceKm)) * 50))
  const best = spots.reduce<T | null>((b, s) => (b === null || measureOf(s) > measureOf(b) ? s : b), null)
  const data = ordered.map((s) => ({ ...s, extraSecPer50Km: per50(s) }))
  return { data, secondsPer50Km: best === null ? null : per50(best) ?? 0 }
}

function tradeNote(secondsPer50Km: number | null): string | null {
  if (secondsPer50Km === null) return null
  if (secondsPer50Km <= 0) return 'The nearest spot is also the best: going further buys nothing.'
  return `Going from the nearest spot to the best buys ${secondsPer50Km.toFixed(1)} s for each extra 50 km. Spots within ${BEST_SPOT_TIE_SEC} s of each other are listed nearest first.`
}
