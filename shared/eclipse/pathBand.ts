import { eclipsePath } from './path'
import type { BesselianElements } from './types'

type Position = [number, number]

/** One row of a latitude/longitude grid over the central path: the longitude intervals (continuous, may leave ±180) it covers. */
export interface BandRow { latDeg: number; intervals: Array<[number, number]> }

const KM_PER_DEG = 111.2

/** Longitudes where the horizontal line at `lat` crosses the closed ring (even-odd rule), sorted. */
function crossings(ring: Position[], lat: number): number[] {
  const xs: number[] = []
  for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
    const [xi, yi] = ring[i]!
    const [xj, yj] = ring[j]!
    if ((yi <= lat && lat < yj) || (yj <= lat && lat < yi)) xs.push(xi + ((lat - yi) * (xj - xi)) / (yj - yi))
  }
  return xs.sort((a, b) => a - b)
}

function mergeIntervals(list: Array<[number, number]>): Array<[number, number]> {
  const sorted = [...list].sort((a, b) => a[0] - b[0])
  const out: Array<[number, number]> = []
  for (const iv of sorted) {
    const last = out[out.length - 1]
    if (last && iv[0] <= last[1]) last[1] = Math.max(last[1], iv[1])
    else out.push([iv[0], iv[1]])
  }
  return out
}

/**
 * The central path as a closed ring: the northern limit, then the southern limit reversed, with
 * continuous longitudes. Null for an eclipse without a central path.
 */
export function centralPathRing(el: BesselianElements, deltaTSec: number, ttMinusClockSec: number): Position[] | null {
  const fc = eclipsePath(el, { stepSec: 60, deltaTSec, ttMinusClockSec, durationFractions: [], antimeridian: 'unwrap' })
  const coords = (line: 'north' | 'south') => {
    const f = fc.features.find((x) => x.properties.kind === 'limit' && x.properties.line === line)
    if (!f) return []
    const g = f.geometry as { type: string; coordinates: unknown }
    return (g.type === 'LineString' ? g.coordinates : (g.coordinates as Position[][]).flat()) as Position[]
  }
  const n = coords('north')
  const s = coords('south')
  if (n.length < 2 || s.length < 2) return null
  // The southern limit may start a turn of longitude away from the northern one.
  const shift = Math.round((n[0]![0] - s[0]![0]) / 360) * 360
  return [...n, ...[...s].reverse().map(([x, y]) => [x + shift, y] as Position)]
}

/**
 * Rows of a regular grid (spacing stepDeg in latitude and longitude, cell centres at whole
 * multiples of stepDeg) that cover the central path plus marginKm on every side. The margin is
 * applied by taking the path's extent at the row's latitude and marginKm north and south of it,
 * widened by marginKm east and west.
 */
export function centralPathRows(ring: Position[], stepDeg: number, marginKm: number): BandRow[] {
  const mLat = marginKm / KM_PER_DEG
  let minLat = Infinity, maxLat = -Infinity
  for (const [, y] of ring) { minLat = Math.min(minLat, y); maxLat = Math.max(maxLat, y) }
  const rows: BandRow[] = []
  const i0 = Math.floor((minLat - mLat) / stepDeg)
  const i1 = Math.ceil((maxLat + mLat) / stepDeg)
  for (let i = i0; i <= i1; i++) {
    const lat = i * stepDeg
    if (lat < -89.9 || lat > 89.9) continue
    const mLon = mLat / Math.max(0.05, Math.cos((lat * Math.PI) / 180))
    const raw: Array<[number, number]> = []
    for (const y of [lat - mLat, lat, lat + mLat]) {
      const xs = crossings(ring, y)
      for (let k = 0; k + 1 < xs.length; k += 2) raw.push([xs[k]! - mLon, xs[k + 1]! + mLon])
    }
    if (raw.length) rows.push({ latDeg: lat, intervals: mergeIntervals(raw) })
  }
  return rows
}
