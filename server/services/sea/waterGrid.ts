import { haversineKm } from '../../../shared/geo/distance'
import { landPolygonsIn } from '../land'

/**
 * A latitude/longitude grid of sea and land over a region, for planning routes that stay on water.
 *
 * - Land: Natural Earth 1:10m land (server/services/land.ts), rasterised at the grid's nodes by an
 *   even-odd scanline fill of every ring (lakes are holes, so they count as land-locked water and are
 *   never reached).
 * - Coastal margin: a node is open water only when it and every node within `marginKm` of it are at sea.
 *   The land is sampled at the nodes, so a spit of land narrower than the node spacing can slip
 *   between them; the margin covers that for spacings up to twice the margin.
 * - Moves: to the 16 nodes of the 8 neighbours and the "knight" moves, each allowed only when the
 *   nodes it passes between are open water too; a move costs its great-circle length. Dijkstra's
 *   algorithm gives the shortest grid route from one node to every node; the chosen route is then
 *   straightened (a leg is extended node by node while every point along it, sampled at a third of the node
 *   spacing, is nearest an open-water node), so it is never longer than the grid route.
 * - Longitudes stay within −180..180 (routes do not cross the antimeridian).
 */
export interface WaterGrid {
  south: number; west: number; stepDeg: number; rows: number; cols: number
  /** 1 = open water (at sea, outside the coastal margin). */
  open: Uint8Array
  marginKm: number
}

export const COASTAL_MARGIN_KM = 5

export function nodeLat(g: WaterGrid, i: number) { return g.south + i * g.stepDeg }
export function nodeLon(g: WaterGrid, j: number) { return g.west + j * g.stepDeg }

/** Builds the grid over [west, east] × [south, north], aligned to multiples of stepDeg. */
export function buildWaterGrid(box: { west: number; south: number; east: number; north: number }, stepDeg: number, marginKm = COASTAL_MARGIN_KM): WaterGrid {
  const south = Math.max(-85, Math.floor(box.south / stepDeg) * stepDeg)
  const north = Math.min(85, Math.ceil(box.north / stepDeg) * stepDeg)
  const west = Math.max(-180, Math.floor(box.west / stepDeg) * stepDeg)
  const east = Math.min(180, Math.ceil(box.east / stepDeg) * stepDeg)
  const rows = Math.round((north - south) / stepDeg) + 1
  const cols = Math.round((east - west) / stepDeg) + 1
  const land = new Uint8Array(rows * cols)
  const crossings: number[][] = Array.from({ length: rows }, () => [])
  for (const poly of landPolygonsIn(west, south, east, north)) {
    for (const ring of poly.coordinates) {
      for (let k = 0, m = ring.length - 1; k < ring.length; m = k++) {
        const [x1, y1] = ring[m]! as [number, number]
        const [x2, y2] = ring[k]! as [number, number]
        if (y1 === y2) continue
        const lo = Math.min(y1, y2), hi = Math.max(y1, y2)
        // Rows whose latitude lies in [lo, hi): the half-open rule counts a vertex once.
        const iFrom = Math.max(0, Math.ceil((lo - south) / stepDeg - 1e-9))
        const iTo = Math.min(rows - 1, Math.ceil((hi - south) / stepDeg - 1e-9) - 1)
        for (let i = iFrom; i <= iTo; i++) {
          const lat = south + i * stepDeg
          if (lat < lo || lat >= hi) continue
          crossings[i]!.push(x1 + ((lat - y1) * (x2 - x1)) / (y2 - y1))
        }
      }
    }
  }
  for (let i = 0; i < rows; i++) {
    const xs = crossings[i]!.sort((a, b) => a - b)
    for (let p = 0; p + 1 < xs.length; p += 2) {
      const jFrom = Math.max(0, Math.ceil((xs[p]! - west) / stepDeg))
      const jTo = Math.min(cols - 1, Math.ceil((xs[p + 1]! - west) / stepDeg) - 1)
      for (let j = jFrom; j <= jTo; j++) land[i * cols + j] = 1
    }
  }
  // Coastal margin: close every node within marginKm of a land node.
  const open = new Uint8Array(rows * cols)
  const latKm = stepDeg * 111.2
  for (let i = 0; i < rows; i++) {
    const lat = south + i * stepDeg
    const lonKm = Math.max(1e-6, latKm * Math.cos((lat * Math.PI) / 180))
    const di = Math.ceil(marginKm / latKm), dj = Math.ceil(marginKm / lonKm)
    for (let j = 0; j < cols; j++) {
      if (land[i * cols + j]) continue
      let clear = true
      for (let a = Math.max(0, i - di); a <= Math.min(rows - 1, i + di) && clear; a++) {
        for (let b = Math.max(0, j - dj); b <= Math.min(cols - 1, j + dj); b++) {
          if (land[a * cols + b] && haversineKm(lat, west + j * stepDeg, south + a * stepDeg, west + b * stepDeg) <= marginKm) { clear = false; break }
        }
      }
      if (clear) open[i * cols + j] = 1
    }
  }
  return { south, west, stepDeg, rows, cols, open, marginKm }
}

export function isOpen(g: WaterGrid, i: number, j: number): boolean {
  return i >= 0 && j >= 0 && i < g.rows && j < g.cols && g.open[i * g.cols + j] === 1
}

/** The open-water node nearest a point within maxKm, or null. */
export function nearestOpenNode(g: WaterGrid, lat: number, lon: number, maxKm: number): { i: number; j: number; km: number } | null {
  const ci = Math.round((lat - g.south) / g.stepDeg), cj = Math.round((lon - g.west) / g.stepDeg)
  const r = Math.ceil(maxKm / (g.stepDeg * 111.2 * Math.max(0.05, Math.cos((lat * Math.PI) / 180)))) + 1
  let best: { i: number; j: number; km: number } | null = null
  for (let i = ci - r; i <= ci + r; i++) {
    for (let j = cj - r; j <= cj + r; j++) {
      if (!isOpen(g, i, j)) continue
      const km = haversineKm(lat, lon, nodeLat(g, i), nodeLon(g, j))
      if (km <= maxKm && (!best || km < best.km)) best = { i, j, km }
    }
  }
  return best
}

const MOVES: Array<[number, number]> = [
  [1, 0], [-1, 0], [0, 1], [0, -1], [1, 1], [1, -1], [-1, 1], [-1, -1],
  [1, 2], [2, 1], [-1, 2], [-2, 1], [1, -2], [2, -1], [-1, -2], [-2, -1],
]

/** Nodes a move passes between (besides its ends), which must be open too. */
function between(di: number, dj: number): Array<[number, number]> {
  if (Math.abs(di) === 1 && Math.abs(dj) === 1) return [[di, 0], [0, dj]]
  if (Math.abs(di) === 2) return [[Math.sign(di), 0], [Math.sign(di), dj]]
  if (Math.abs(dj) === 2) return [[0, Math.sign(dj)], [di, Math.sign(dj)]]
  return []
}

/** Shortest grid distances (km) from a node to every open node (Infinity where unreachable), with predecessors. */
export function distancesFrom(g: WaterGrid, start: { i: number; j: number }): { km: Float64Array; prev: Int32Array } {
  const n = g.rows * g.cols
  const km = new Float64Array(n).fill(Infinity)
  const prev = new Int32Array(n).fill(-1)
  const s = start.i * g.cols + start.j
  km[s] = 0
  // Binary heap of [distance, node].
  const hd: number[] = [], hn: number[] = []
  const push = (d: number, v: number) => {
    let k = hd.length
    hd.push(d); hn.push(v)
    while (k > 0) {
      const p = (k - 1) >> 1
      if (hd[p]! <= d) break
      hd[k] = hd[p]!; hn[k] = hn[p]!; k = p
    }
    hd[k] = d; hn[k] = v
  }
  const pop = (): [number, number] => {
    const d0 = hd[0]!, v0 = hn[0]!
    const d = hd.pop()!, v = hn.pop()!
    if (hd.length) {
      let k = 0
      for (;;) {
        const l = 2 * k + 1
        if (l >= hd.length) break
        const r = l + 1
        const c = r < hd.length && hd[r]! < hd[l]! ? r : l
        if (hd[c]! >= d) break
        hd[k] = hd[c]!; hn[k] = hn[c]!; k = c
      }
      hd[k] = d; hn[k] = v
    }
    return [d0, v0]
  }
  push(0, s)
  while (hd.length) {
    const [d, v] = pop()
    if (d > km[v]!) continue
    const i = Math.floor(v / g.cols), j = v % g.cols
    const lat = nodeLat(g, i), lon = nodeLon(g, j)
    for (const [di, dj] of MOVES) {
      const a = i + di, b = j + dj
      if (!isOpen(g, a, b)) continue
      if (!between(di, dj).every(([x, y]) => isOpen(g, i + x, j + y))) continue
      const w = a * g.cols + b
      const nd = d + haversineKm(lat, lon, nodeLat(g, a), nodeLon(g, b))
      if (nd < km[w]!) { km[w] = nd; prev[w] = v; push(nd, w) }
    }
  }
  return { km, prev }
}

/** Whether the straight leg between two points stays on open water (sampled at a third of the spacing). */
export function legIsOpen(g: WaterGrid, lat1: number, lon1: number, lat2: number, lon2: number): boolean {
  const steps = Math.max(1, Math.ceil(Math.max(Math.abs(lat2 - lat1), Math.abs(lon2 - lon1)) / (g.stepDeg / 3)))
  for (let k = 0; k <= steps; k++) {
    const f = k / steps
    const i = Math.round((lat1 + f * (lat2 - lat1) - g.south) / g.stepDeg)
    const j = Math.round((lon1 + f * (lon2 - lon1) - g.west) / g.stepDeg)
    if (!isOpen(g, i, j)) return false
  }
  return true
}

/** The grid route to node `end` as [lon, lat] points, straightened; null when unreachable. */
export function routeTo(g: WaterGrid, prev: Int32Array, end: { i: number; j: number }): Array<[number, number]> | null {
  const nodes: Array<[number, number]> = []
  let v = end.i * g.cols + end.j
  for (let guard = 0; v >= 0 && guard < g.rows * g.cols; guard++) {
    nodes.push([nodeLon(g, v % g.cols), nodeLat(g, Math.floor(v / g.cols))])
    v = prev[v]!
  }
  nodes.reverse()
  if (!nodes.length) return null
  const out: Array<[number, number]> = [nodes[0]!]
  let k = 0
  while (k < nodes.length - 1) {
    // Extend the leg node by node while it stays on open water.
    let far = k + 1
    while (far + 1 < nodes.length && legIsOpen(g, nodes[k]![1], nodes[k]![0], nodes[far + 1]![1], nodes[far + 1]![0])) far++
    out.push(nodes[far]!)
    k = far
  }
  return out
}

export function routeKm(route: Array<[number, number]>): number {
  let km = 0
  for (let k = 1; k < route.length; k++) km += haversineKm(route[k - 1]![1], route[k - 1]![0], route[k]![1], route[k]![0])
  return km
}
