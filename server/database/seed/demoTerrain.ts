import { writeArrayBuffer } from 'geotiff'

/**
 * DEMO DATA — NOT A REAL HEIGHT MODEL. An invented straight ridge for trying the terrain check: a
 * GeoTIFF (EPSG:4326, metres) of flat ground with a wall of `heightM` running across `azimuthDeg`,
 * from `distanceKm` to `distanceKm` + `thicknessKm` out from the point. Used by the demo and the tests.
 */
export function ridgeTiff(o: { lat: number; lon: number; azimuthDeg: number; distanceKm: number; heightM: number; groundM?: number; thicknessKm?: number; halfSizeDeg?: number; cellDeg?: number }): Uint8Array {
  const half = o.halfSizeDeg ?? 0.05
  const cell = o.cellDeg ?? 0.0005
  const n = Math.round((2 * half) / cell)
  const west = o.lon - half, north = o.lat + half
  const az = (o.azimuthDeg * Math.PI) / 180
  const kmPerDegLat = 111.32
  const kmPerDegLon = 111.32 * Math.cos((o.lat * Math.PI) / 180)
  const thickness = o.thicknessKm ?? 0.4
  const heights = new Float32Array(n * n)
  for (let r = 0; r < n; r++) {
    const lat = north - (r + 0.5) * cell
    for (let c = 0; c < n; c++) {
      const lon = west + (c + 0.5) * cell
      const along = (lon - o.lon) * kmPerDegLon * Math.sin(az) + (lat - o.lat) * kmPerDegLat * Math.cos(az)
      heights[r * n + c] = along >= o.distanceKm && along <= o.distanceKm + thickness ? o.heightM : (o.groundM ?? 10)
    }
  }
  return new Uint8Array(writeArrayBuffer(heights, {
    width: n, height: n, GeographicTypeGeoKey: 4326, GTModelTypeGeoKey: 2, GTRasterTypeGeoKey: 1,
    ModelPixelScale: [cell, cell, 0], ModelTiepoint: [0, 0, 0, west, north, 0],
  }) as ArrayBuffer)
}
