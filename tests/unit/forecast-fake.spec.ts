import { createServer, type Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { buildForecastResponse, cloudFor, parseForecastQuery, POINT_RADIUS_KM } from '../../fakes/forecast/build.mjs'
import { haversineKm } from '../../shared/geo/distance'
import { fetchCloudSeries, valueAt } from '../../server/services/forecastClient'

// The fake's answers go through the real SDK (openmeteo's fetchWeatherApi and @openmeteo/sdk's
// FlatBuffers readers) exactly as the app reads them: the app's client is the thing under test here.
type Settings = { default: number; points: Array<{ lat: number; lon: number; cloudCoverPct: number }> } | null
let settings: Settings = null
let server: Server
let base = ''
let lastQuery = ''
beforeAll(async () => {
  server = createServer((req, res) => {
    const u = new URL(req.url ?? '/', 'http://127.0.0.1')
    lastQuery = u.search
    const q = parseForecastQuery(u.searchParams, Date.parse('2027-07-29T06:00:00Z'))
    if ('reason' in q) { res.writeHead(400, { 'content-type': 'application/json' }); res.end(JSON.stringify({ error: true, reason: q.reason })); return }
    res.writeHead(200, { 'content-type': 'application/octet-stream' })
    res.end(buildForecastResponse(q, (lat: number, lon: number, h: number, layer: string) => cloudFor(settings, lat, lon, h, layer)))
  })
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()))
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}/v1/forecast`
})
afterAll(() => new Promise<void>((r) => server.close(() => r())))

const LUXOR = { lat: 25.6872, lon: 32.6396 }
const QENA = { lat: 26.1551, lon: 32.716 }

describe('the forecast fake, read through the official SDK', () => {
  it('answers one location per point, hourly over the whole days asked for, with the four layers in order', async () => {
    settings = null
    const [a, b] = await fetchCloudSeries(base, [LUXOR, QENA], '2027-08-01', '2027-08-03')
    expect(lastQuery).toContain('format=flatbuffers')
    for (const s of [a!, b!]) {
      expect(s.startMs).toBe(Date.parse('2027-08-01T00:00:00Z'))
      expect(s.intervalSec).toBe(3600)
      for (const layer of [s.total, s.low, s.mid, s.high]) {
        expect(layer).toHaveLength(72)
        for (const v of layer) expect(v >= 0 && v <= 100).toBe(true)
      }
    }
    // The demo pattern's values are the fake's own function, hour by hour (rounded as served).
    const h = Date.parse('2027-08-02T09:00:00Z')
    expect(a!.low[33]).toBe(Math.round(cloudFor(null, LUXOR.lat, LUXOR.lon, h, 'low')))
    expect(b!.total[33]).toBe(Math.round(cloudFor(null, QENA.lat, QENA.lon, h, 'total')))
    // The demo pattern moves through the day (it is not one flat number), and is revised from one issue hour to the next.
    expect(new Set(a!.low).size).toBeGreaterThan(5)
    const issues = Array.from({ length: 12 }, (_, i) => cloudFor(null, LUXOR.lat, LUXOR.lon, h, 'total', i * 3_600_000))
    expect(new Set(issues.map(Math.round)).size).toBeGreaterThan(3)
  })

  it('set points change every layer and hour within 30 km; elsewhere the default', async () => {
    settings = { default: 80, points: [{ ...QENA, cloudCoverPct: 7 }] }
    const [luxor, qena] = await fetchCloudSeries(base, [LUXOR, QENA], '2027-08-02', '2027-08-02')
    for (const v of [...qena!.total, ...qena!.low, ...qena!.mid, ...qena!.high]) expect(v).toBe(7)
    for (const v of [...luxor!.total, ...luxor!.high]) expect(v).toBe(80)
    // The 30 km edge: one point 29 km north of Qena is inside, one 31 km north is not (1° of latitude ≈ 111.2 km).
    const inside = { lat: QENA.lat + 29 / 111.2, lon: QENA.lon }, outside = { lat: QENA.lat + 31 / 111.2, lon: QENA.lon }
    expect(haversineKm(QENA.lat, QENA.lon, inside.lat, inside.lon)).toBeLessThan(POINT_RADIUS_KM)
    expect(haversineKm(QENA.lat, QENA.lon, outside.lat, outside.lon)).toBeGreaterThan(POINT_RADIUS_KM)
    const [i, o] = await fetchCloudSeries(base, [inside, outside], '2027-08-02', '2027-08-02')
    expect(i!.total[10]).toBe(7)
    expect(o!.total[10]).toBe(80)
  })

  it('a request the service refuses is an error the caller can show', async () => {
    await expect(fetchCloudSeries(base, [LUXOR], '2027-08-03', '2027-08-01')).rejects.toThrow(/End-date must be larger/)
  })
})

describe('values at the time of maximum', () => {
  const start = Date.parse('2027-08-02T00:00:00Z')
  it.each([
    ['on the hour', 9 * 3600_000, 30],
    ['a quarter past', 9.25 * 3600_000, 35],
    ['half past', 9.5 * 3600_000, 40],
  ])('interpolates linearly between hours (%s)', (_, dt, want) => {
    const values = Array.from({ length: 24 }, (_, i) => (i === 9 ? 30 : i === 10 ? 50 : 0))
    expect(valueAt(start, 3600, values, start + dt)).toBeCloseTo(want, 9)
  })
  it('is null outside the series or next to a missing hour', () => {
    expect(valueAt(start, 3600, [10, 20], start - 1)).toBeNull()
    expect(valueAt(start, 3600, [10, 20], start + 3600_001)).toBeNull()
    expect(valueAt(start, 3600, [10, Number.NaN], start + 1800_000)).toBeNull()
  })
})
