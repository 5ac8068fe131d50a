// The forecast fake's pieces: its query parsing, its cloud values and its FlatBuffers encoding.
// Kept apart from the HTTP server so a unit test can decode a built response with the real SDK.
//
// The encoding follows Open-Meteo's schema (github.com/open-meteo/sdk, weather_api.fbs) through the
// vtable slots the SDK's generated readers use: WeatherApiResponse (15 fields), VariablesWithTime
// (4) and VariableWithValues (13). The SDK ships readers only, so the tables are written here with
// the `flatbuffers` Builder it depends on.
import { Builder } from 'flatbuffers'
import { Unit } from '@openmeteo/sdk/unit.js'
import { Variable } from '@openmeteo/sdk/variable.js'

/** The hourly variables this fake serves, by their API name. */
export const HOURLY = {
  cloud_cover: { variable: Variable.cloud_cover, layer: 'total' },
  cloud_cover_low: { variable: Variable.cloud_cover_low, layer: 'low' },
  cloud_cover_mid: { variable: Variable.cloud_cover_mid, layer: 'mid' },
  cloud_cover_high: { variable: Variable.cloud_cover_high, layer: 'high' },
}

const HOUR_MS = 3_600_000
const DAY_MS = 86_400_000
/** Radius of a set point's influence, km (the control call's contract). */
export const POINT_RADIUS_KM = 30
const EARTH_MEAN_RADIUS_KM = 6371.0088 // IUGG mean radius

function haversineKm(lat1, lon1, lat2, lon2) {
  const rad = Math.PI / 180
  const a = Math.sin(((lat2 - lat1) * rad) / 2) ** 2 + Math.cos(lat1 * rad) * Math.cos(lat2 * rad) * Math.sin(((lon2 - lon1) * rad) / 2) ** 2
  return 2 * EARTH_MEAN_RADIUS_KM * Math.asin(Math.min(1, Math.sqrt(a)))
}

const DATE = /^\d{4}-\d{2}-\d{2}$/

/**
 * Reads a forecast request as the real service would. Returns { lats, lons, hourly: [names], startMs,
 * endMs (exclusive) } or { reason } for a request the real service would refuse with 400.
 */
export function parseForecastQuery(params, nowMs) {
  const nums = (s) => (s ?? '').split(',').filter((x) => x !== '').map(Number)
  const lats = nums(params.get('latitude'))
  const lons = nums(params.get('longitude'))
  if (!lats.length || lats.length !== lons.length) return { reason: 'Parameter \'latitude\' and \'longitude\' must have the same number of elements' }
  if (lats.some((v) => !Number.isFinite(v) || v < -90 || v > 90) || lons.some((v) => !Number.isFinite(v) || v < -180 || v > 180)) return { reason: 'Latitude must be in range of -90 to 90°. Longitude must be in range of -180 to 180°.' }
  const hourly = (params.get('hourly') ?? '').split(',').filter(Boolean)
  const unknown = hourly.find((h) => !(h in HOURLY))
  if (unknown) return { reason: `Cannot initialize WeatherVariable from invalid String value ${unknown}` }
  const tz = (params.get('timezone') ?? 'GMT').toUpperCase()
  if (tz !== 'GMT' && tz !== 'UTC') return { reason: 'This fake serves GMT only' }
  const start = params.get('start_date'), end = params.get('end_date')
  let startMs, endMs
  if (start || end) {
    if (!start || !end || !DATE.test(start) || !DATE.test(end)) return { reason: 'Parameter \'start_date\' and \'end_date\' must be given together as yyyy-mm-dd' }
    startMs = Date.parse(`${start}T00:00:00Z`)
    endMs = Date.parse(`${end}T00:00:00Z`) + DAY_MS
    if (!(endMs > startMs)) return { reason: 'End-date must be larger or equal than start-date' }
  } else {
    const days = Number(params.get('forecast_days') ?? 7)
    if (!Number.isInteger(days) || days < 1 || days > 16) return { reason: 'Forecast days is invalid. Allowed range 0 to 16.' }
    startMs = Math.floor(nowMs / DAY_MS) * DAY_MS
    endMs = startMs + days * DAY_MS
  }
  return { lats, lons, hourly, startMs, endMs }
}

/** A stable pseudo-random number in [0, 1) for a grid cell (0.25°, about the size of a model's cell). */
function cellNoise(lat, lon, salt) {
  let h = 2166136261 ^ salt
  for (const v of [Math.round(lat * 4), Math.round(lon * 4)]) {
    h = Math.imul(h ^ (v & 0xffff), 16777619)
    h = Math.imul(h ^ (v >>> 16), 16777619)
  }
  h ^= h >>> 13
  h = Math.imul(h, 0x5bd1e995)
  h ^= h >>> 15
  return (h >>> 0) / 4294967296
}

const clampPct = (v) => Math.max(0, Math.min(100, v))

/**
 * The demo pattern, in percent: per cell a base amount of each layer, a daily cycle of low cloud
 * peaking in the local afternoon (convection), and slow weather systems passing over a few days;
 * plus a small change from one issue hour to the next (`issueMs`), so that runs fetched an hour
 * apart differ a little, as real forecasts do. Invented and deterministic; not a model of any real climate.
 */
function demoLayer(lat, lon, hourMs, layer, issueMs) {
  const solarHour = ((hourMs / HOUR_MS + lon / 15) % 24 + 24) % 24
  const days = hourMs / DAY_MS
  const salt = { low: 7, mid: 8, high: 9 }[layer]
  const revision = 8 * Math.sin(issueMs / (7 * HOUR_MS) + 6 * cellNoise(lat, lon, salt))
  if (layer === 'low') {
    const base = 5 + 30 * cellNoise(lat, lon, 1)
    const convective = 20 * Math.max(0, Math.sin(((solarHour - 9) / 12) * Math.PI))
    return clampPct(base + convective + 15 * Math.sin(days / 2.3 + 6 * cellNoise(lat, lon, 2)) + revision)
  }
  if (layer === 'mid') return clampPct(10 + 30 * cellNoise(lat, lon, 3) + 20 * Math.sin(days / 3.1 + 6 * cellNoise(lat, lon, 4)) + revision)
  return clampPct(5 + 40 * cellNoise(lat, lon, 5) + 25 * Math.sin(days / 1.7 + 6 * cellNoise(lat, lon, 6)) + revision)
}

/**
 * Cloud in percent for a location, hour (ms, UTC) and layer ('total', 'low', 'mid', 'high'), as
 * forecast at the issue hour `issueMs` (demo pattern only). With settings, a point within 30 km sets
 * every layer and hour (the nearest wins); elsewhere the default.
 */
export function cloudFor(settings, lat, lon, hourMs, layer, issueMs = 0) {
  if (settings) {
    let best = null
    for (const p of settings.points) {
      const d = haversineKm(lat, lon, p.lat, p.lon)
      if (d <= POINT_RADIUS_KM && (!best || d < best.d)) best = { d, pct: p.cloudCoverPct }
    }
    return best ? best.pct : settings.default
  }
  if (layer !== 'total') return demoLayer(lat, lon, hourMs, layer, issueMs)
  // Total cover from the layers with random overlap: 1 − Π(1 − layer).
  const clear = ['low', 'mid', 'high'].reduce((p, l) => p * (1 - demoLayer(lat, lon, hourMs, l, issueMs) / 100), 1)
  return clampPct(100 * (1 - clear))
}

/** Encodes one location's answer: a size-prefixed WeatherApiResponse. */
function encodeLocation(q, lat, lon, cloud) {
  const b = new Builder(1024)
  const hours = []
  for (let t = q.startMs; t < q.endMs; t += HOUR_MS) hours.push(t)
  const variables = q.hourly.map((name) => {
    const { variable, layer } = HOURLY[name]
    b.startVector(4, hours.length, 4)
    for (let i = hours.length - 1; i >= 0; i--) b.addFloat32(Math.round(cloud(lat, lon, hours[i], layer)))
    const values = b.endVector()
    b.startObject(13)
    b.addFieldInt8(0, variable, 0) // variable: uint8 enum
    b.addFieldInt8(1, Unit.percentage, 0) // unit
    b.addFieldOffset(3, values, 0) // values: [float]
    return b.endObject()
  })
  b.startVector(4, variables.length, 4)
  for (let i = variables.length - 1; i >= 0; i--) b.addOffset(variables[i])
  const vars = b.endVector()
  b.startObject(4)
  b.addFieldInt64(0, BigInt(q.startMs / 1000), BigInt(0)) // time
  b.addFieldInt64(1, BigInt(q.endMs / 1000), BigInt(0)) // timeEnd (exclusive)
  b.addFieldInt32(2, 3600, 0) // interval, s
  b.addFieldOffset(3, vars, 0)
  const hourly = b.endObject()
  const tz = b.createString('GMT')
  const tzAbbr = b.createString('GMT')
  b.startObject(15)
  // The real service answers with its grid cell's centre; the fake answers the point asked for.
  b.addFieldFloat32(0, lat, 0)
  b.addFieldFloat32(1, lon, 0)
  b.addFieldFloat32(2, 0, 0) // elevation
  b.addFieldFloat32(3, 0.1, 0) // generation time, ms
  b.addFieldInt32(6, 0, 0) // UTC offset, s
  b.addFieldOffset(7, tz, 0)
  b.addFieldOffset(8, tzAbbr, 0)
  b.addFieldOffset(11, hourly, 0)
  b.finish(b.endObject(), undefined, true)
  return b.asUint8Array()
}

/** The whole answer: every location's message, one after another, as the real service streams them. */
export function buildForecastResponse(q, cloud) {
  const parts = q.lats.map((lat, i) => encodeLocation(q, lat, q.lons[i], cloud))
  return Buffer.concat(parts.map((p) => Buffer.from(p)))
}
