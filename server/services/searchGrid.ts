import { haversineKm } from '../../shared/geo/distance'

/** The most grid points the best-ground search evaluates in one request (a disc at radius/100 spacing holds about π·100² ≈ 31,400). */
export const SEARCH_GRID_MAX_POINTS = 40_000

/** Points more than this far from a pole are searched; nearer, a row of longitudes collapses to a point. */
const POLE_GAP_DEG = 0.5

/**
 * The points the best-ground search evaluates: a grid over the disc of `radiusKm` around (lat, lon),
 * `stepKm` apart north–south and east–west. Each row spans at most 360° of longitude (near a pole
 * the disc's longitude span grows as 1/cos(lat), and without this cap a row would wrap the globe many
 * times over); if the grid would still hold more than maxPoints, the step is widened until it does
 * not. Longitudes are continuous from `lon` (callers wrap them).
 */
export function searchGrid(lat: number, lon: number, radiusKm: number, stepKm: number, maxPoints = SEARCH_GRID_MAX_POINTS) {
  let step = stepKm
  for (;;) {
    const dLat = step / 111.2
    const n = Math.ceil(radiusKm / step)
    const points: Array<{ lat: number; lon: number }> = []
    for (let i = -n; i <= n && points.length <= maxPoints; i++) {
      const rowLat = lat + i * dLat
      if (Math.abs(rowLat) > 90 - POLE_GAP_DEG) continue
      const cos = Math.cos((rowLat * Math.PI) / 180)
      const dLon = dLat / cos
      // Whole turns of longitude are the same points: at most one (j from −m to m spans under 360°).
      const m = Math.min(Math.ceil(radiusKm / step / cos), Math.ceil(180 / dLon) - 1)
      for (let j = -m; j <= m; j++) {
        const pLon = lon + j * dLon
        if (haversineKm(lat, lon, rowLat, pLon) <= radiusKm) points.push({ lat: rowLat, lon: pLon })
      }
    }
    if (points.length <= maxPoints) return { stepKm: step, points }
    // Too many: a coarser step, by the square root of the excess (the count goes as 1/step²).
    step *= Math.max(1.05, Math.sqrt(points.length / maxPoints))
  }
}
