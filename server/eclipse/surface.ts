import { centralDurationEvaluator } from '../../shared/eclipse/centralDuration'
import { centralPathRing, centralPathRows } from '../../shared/eclipse/pathBand'
import type { BesselianElements } from '../../shared/eclipse/types'

/** Grid spacing of the expected-seen surface: 0.04° is 4.45 km in latitude and less in longitude everywhere. */
export const SURFACE_STEP_DEG = 0.04
/** How far beyond the central path's limits the surface is evaluated, km. */
export const SURFACE_MARGIN_KM = 25

/** A run of adjacent cells in one row: cell j sits at longitude j × stepDeg (continuous longitudes). */
export interface SurfaceRun { j0: number; durationSec: Float32Array; pClear: Float32Array; sunAltitudeDeg: Float32Array }
export interface SurfaceRow { latDeg: number; runs: SurfaceRun[] }
export interface SurfaceGrid { stepDeg: number; rows: SurfaceRow[]; cells: number }

export const wrapLon = (lon: number) => ((((lon + 180) % 360) + 360) % 360) - 180

/**
 * Central duration, P(clear) and the Sun's altitude at maximum on a regular grid over the central
 * path plus a margin. `pClearAt` gives P(clear) at a point (null where unknown); without it every
 * P(clear) is NaN. Null for an eclipse without a central path.
 */
export function expectedSeenGrid(el: BesselianElements, deltaTSec: number, ttMinusClockSec: number,
  pClearAt: ((lat: number, lon: number) => number | null) | null, stepDeg = SURFACE_STEP_DEG, marginKm = SURFACE_MARGIN_KM): SurfaceGrid | null {
  const ring = centralPathRing(el, deltaTSec, ttMinusClockSec)
  if (!ring) return null
  const evaluate = centralDurationEvaluator(el, deltaTSec)
  const rows: SurfaceRow[] = []
  let cells = 0
  let rowGuess = 0
  for (const r of centralPathRows(ring, stepDeg, marginKm)) {
    const runs: SurfaceRun[] = []
    let guess = rowGuess
    let first = true
    for (const [lo, hi] of r.intervals) {
      const j0 = Math.ceil(lo / stepDeg)
      const j1 = Math.floor(hi / stepDeg)
      if (j1 < j0) continue
      const n = j1 - j0 + 1
      const run: SurfaceRun = { j0, durationSec: new Float32Array(n), pClear: new Float32Array(n), sunAltitudeDeg: new Float32Array(n) }
      for (let k = 0; k < n; k++) {
        const lon = wrapLon((j0 + k) * stepDeg)
        const s = evaluate(r.latDeg, lon, 0, guess)
        guess = s.tMax
        if (first) { rowGuess = s.tMax; first = false }
        run.durationSec[k] = s.durationSec
        run.sunAltitudeDeg[k] = s.sunAltitudeDeg
        const p = pClearAt && s.durationSec > 0 ? pClearAt(r.latDeg, lon) : null
        run.pClear[k] = p === null ? Number.NaN : p
      }
      cells += n
      runs.push(run)
    }
    if (runs.length) rows.push({ latDeg: r.latDeg, runs })
  }
  return { stepDeg, rows, cells }
}

/** Our sequential palette for the bands, from the lowest to the highest. */
export const BAND_COLOURS = ['#3b3466', '#4f4584', '#66569a', '#8a66a0', '#b07592', '#d48d6c', '#e9ad46', '#f7d25c']

const NICE_STEPS_SEC = [5, 10, 15, 20, 30, 45, 60, 90, 120, 180]

export interface SurfaceCell { lat: number; lon: number; durationSec: number; pClear: number | null; expectedSec: number | null; sunAltitudeDeg: number }

/**
 * The grid as GeoJSON bands: cells of equal band joined along each row into rectangles, one
 * MultiPolygon per band. The measure is expected seen seconds (duration × P(clear)), or the
 * duration alone when there is no climatology. Cells where the Sun is below the horizon at maximum,
 * outside the central path, or without cloud data are left out.
 */
export function surfaceBands(grid: SurfaceGrid, measure: 'expected' | 'duration') {
  const valueOf = (run: SurfaceRun, k: number) => {
    const d = run.durationSec[k]!
    if (!(d > 0) || run.sunAltitudeDeg[k]! < 0) return Number.NaN
    return measure === 'duration' ? d : d * run.pClear[k]!
  }
  let max = 0
  let best: SurfaceCell | null = null
  for (const row of grid.rows) for (const run of row.runs) for (let k = 0; k < run.durationSec.length; k++) {
    const v = valueOf(run, k)
    if (v > max) {
      max = v
      const p = run.pClear[k]!
      best = {
        lat: row.latDeg, lon: wrapLon((run.j0 + k) * grid.stepDeg), durationSec: run.durationSec[k]!, pClear: Number.isNaN(p) ? null : p,
        expectedSec: Number.isNaN(p) ? null : run.durationSec[k]! * p, sunAltitudeDeg: run.sunAltitudeDeg[k]!,
      }
    }
  }
  const bandStepSec = NICE_STEPS_SEC.find((s) => s * BAND_COLOURS.length >= max) ?? Math.ceil(max / BAND_COLOURS.length)
  const nBands = Math.max(1, Math.ceil(max / bandStepSec))
  const rects: number[][][][][] = Array.from({ length: nBands }, () => [])
  const h = grid.stepDeg / 2
  const r4 = (v: number) => Math.round(v * 1e4) / 1e4
  for (const row of grid.rows) {
    const s = r4(row.latDeg - h), n = r4(row.latDeg + h)
    for (const run of row.runs) {
      let start = -1, cls = -1
      const close = (endK: number) => {
        if (cls < 0) return
        const w = r4((run.j0 + start) * grid.stepDeg - h), e = r4((run.j0 + endK) * grid.stepDeg + h)
        rects[cls]!.push([[[w, s], [e, s], [e, n], [w, n], [w, s]]])
      }
      for (let k = 0; k <= run.durationSec.length; k++) {
        const v = k < run.durationSec.length ? valueOf(run, k) : Number.NaN
        const c = v > 0 ? Math.min(nBands - 1, Math.floor(v / bandStepSec)) : -1
        if (c !== cls) {
          close(k - 1)
          cls = c
          start = k
        }
      }
    }
  }
  const colourOf = (i: number) => BAND_COLOURS[Math.max(0, BAND_COLOURS.length - nBands + i)]!
  const legend = Array.from({ length: nBands }, (_, i) => ({ fromSec: i * bandStepSec, toSec: (i + 1) * bandStepSec, colour: colourOf(i) }))
  const features = rects.map((polys, i) => ({
    type: 'Feature' as const,
    geometry: { type: 'MultiPolygon' as const, coordinates: polys },
    properties: { band: i, fromSec: i * bandStepSec, toSec: (i + 1) * bandStepSec, colour: colourOf(i) },
  })).filter((f) => f.geometry.coordinates.length > 0)
  return { features, legend, bandStepSec, best, maxSec: max }
}
