/**
 * DEMO DATA — NOT A REAL CLIMATOLOGY. An invented August cloud-cover grid over the region of the
 * 2027-08-02 path (Atlantic to the Arabian Sea), made of smooth blobs so the demo has something to
 * show. Deterministic. Written out by `npx tsx scripts/make-demo-cloud.ts`, loaded by the demo seed.
 */
export const DEMO_CLOUD_NAME = 'Demo data — not a real climatology (invented August cloud)'
export const DEMO_CLOUD_SOURCE = 'Invented by Umbrafield (server/database/seed/demoCloud.ts) for the demo only'

const blob = (lat: number, lon: number, lat0: number, lon0: number, rLat: number, rLon: number, amp: number) =>
  amp * Math.exp(-(((lat - lat0) / rLat) ** 2 + ((lon - lon0) / rLon) ** 2))

/** Invented mean cloud cover, percent, for August. */
export function demoCloudPct(lat: number, lon: number): number {
  let c = 6
  c += blob(lat, lon, 36.5, -8, 2.5, 5, 18) // Atlantic marine stratus near the strait
  c += blob(lat, lon, 33, 18, 2, 10, 8) // Mediterranean coast
  c += blob(lat, lon, 20, 39.5, 3, 2, 16) // Red Sea coastal haze and cloud
  c += blob(lat, lon, 16, 43.5, 3.5, 2.5, 50) // highland showers
  c += blob(lat, lon, 9, 48, 4, 5, 45) // monsoon cloud over the Horn
  c += 2.5 * Math.sin(lat * 1.7 + lon * 0.9) * Math.cos(lon * 0.6) // texture
  return Math.max(1, Math.min(95, c))
}

/** Cloud categories consistent with the invented mean cover (clear + scattered + broken + overcast = 100). */
export function demoCategories(cloud: number) {
  const clear = Math.max(0, 100 - 1.5 * cloud)
  const overcast = Math.max(0, cloud - 40) * 0.8
  const rest = 100 - clear - overcast
  return { clear, scattered: rest * 0.6, broken: rest * 0.4 }
}

export function demoCloudCsv(): string {
  const lines = ['lat,lon,month,cloud_pct,clear_pct,scattered_pct,broken_pct']
  for (let lat = 5; lat <= 42.0001; lat += 0.5) {
    for (let lon = -12; lon <= 52.0001; lon += 0.5) {
      const c = demoCloudPct(lat, lon)
      const k = demoCategories(c)
      lines.push([lat.toFixed(1), lon.toFixed(1), 8, c.toFixed(1), k.clear.toFixed(1), k.scattered.toFixed(1), k.broken.toFixed(1)].join(','))
    }
  }
  return lines.join('\n') + '\n'
}

/** A grid region (degrees; longitudes −180..180, west < east) and its spacing. */
export interface DemoCloudRegion { south: number; north: number; west: number; east: number; stepDeg: number }

/** A small deterministic hash of a text to [0, 1) (FNV-1a), so every eclipse gets its own invented weather. */
function unit(text: string): number {
  let h = 0x811c9dc5
  for (const ch of text) { h ^= ch.charCodeAt(0); h = Math.imul(h, 0x01000193) >>> 0 }
  return h / 2 ** 32
}

/**
 * DEMO DATA — invented mean cloud cover, percent, for any region and month (the demo's later
 * eclipses). A smooth made-up field: cloudier near the equator and at high latitudes, clearer
 * around 25° (a caricature, not a climatology), plus a few blobs placed by hashing `key`.
 */
export function demoCloudPctAnywhere(key: string, lat: number, lon: number): number {
  const a = Math.abs(lat)
  let c = 18 + 28 * Math.exp(-((a / 10) ** 2)) + 30 * Math.max(0, Math.min(1, (a - 35) / 25)) - 10 * Math.exp(-(((a - 25) / 8) ** 2))
  for (let i = 0; i < 4; i++) {
    const lat0 = -60 + 120 * unit(`${key}:lat:${i}`)
    const lon0 = -180 + 360 * unit(`${key}:lon:${i}`)
    let dLon = Math.abs(lon - lon0)
    if (dLon > 180) dLon = 360 - dLon
    c += (unit(`${key}:amp:${i}`) * 40 - 15) * Math.exp(-(((lat - lat0) / 8) ** 2 + (dLon / 14) ** 2))
  }
  c += 3 * Math.sin(lat * 1.3 + lon * 0.7) * Math.cos(lon * 0.5) // texture
  return Math.max(1, Math.min(95, c))
}

/** The invented grid for one region and month, as a CSV grid (the same format the climatology import reads). */
export function demoCloudCsvFor(key: string, month: number, r: DemoCloudRegion): string {
  const lines = ['lat,lon,month,cloud_pct,clear_pct,scattered_pct,broken_pct']
  const nLat = Math.round((r.north - r.south) / r.stepDeg)
  const nLon = Math.round((r.east - r.west) / r.stepDeg)
  for (let i = 0; i <= nLat; i++) {
    const lat = r.south + i * r.stepDeg
    for (let j = 0; j <= nLon; j++) {
      const lon = r.west + j * r.stepDeg
      const c = demoCloudPctAnywhere(key, lat, lon)
      const k = demoCategories(c)
      lines.push([lat.toFixed(2), lon.toFixed(2), month, c.toFixed(1), k.clear.toFixed(1), k.scattered.toFixed(1), k.broken.toFixed(1)].join(','))
    }
  }
  return lines.join('\n') + '\n'
}
