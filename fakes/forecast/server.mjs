// A local stand-in for the hourly cloud-cover part of Open-Meteo's forecast API, speaking its
// FlatBuffers format, so the official `openmeteo` SDK reads it unchanged (point the app's
// NUXT_FORECAST_API_URL at http://127.0.0.1:PORT/v1/forecast).
//
// Env: FORECAST_FAKE_PORT (12121).
// GET /v1/forecast?latitude=a,b&longitude=c,d&hourly=cloud_cover,…&start_date=&end_date=&format=flatbuffers
//   One size-prefixed WeatherApiResponse per location, as the real service sends them.
// Control (for scripts and tests):
//   POST /_fake/forecast/set {"default": pct, "points": [{"lat", "lon", "cloudCoverPct"}]}: each point sets
//     the cloud within 30 km of it (the nearest point wins where they overlap), for every hour and every
//     layer; everything else gets the default. POST /_fake/forecast/reset goes back to the demo pattern.
//   GET /_fake/forecast/state, GET /_fake/health.
// Without a set, every location gets a deterministic demo pattern (build.mjs), revised each hour: plausible, not real weather.
import { createServer } from 'node:http'
import { buildForecastResponse, cloudFor, parseForecastQuery } from './build.mjs'

const PORT = Number(process.env.FORECAST_FAKE_PORT || 12121)

/** null: the demo pattern; otherwise { default, points }. */
let settings = null
let requests = 0

function sendJson(res, status, body) {
  res.writeHead(status, { 'content-type': 'application/json' })
  res.end(JSON.stringify(body))
}

async function readJson(req) {
  let text = ''
  for await (const chunk of req) text += chunk
  return text ? JSON.parse(text) : {}
}

function validSettings(b) {
  const pct = (v) => typeof v === 'number' && Number.isFinite(v) && v >= 0 && v <= 100
  if (!b || typeof b !== 'object' || !pct(b.default)) return 'default must be a percentage (0–100)'
  if (b.points !== undefined && !Array.isArray(b.points)) return 'points must be a list'
  for (const p of b.points ?? []) {
    if (!p || typeof p.lat !== 'number' || typeof p.lon !== 'number' || !pct(p.cloudCoverPct)) return 'each point needs lat, lon and cloudCoverPct (0–100)'
  }
  return null
}

const server = createServer(async (req, res) => {
  try {
    const u = new URL(req.url ?? '/', 'http://127.0.0.1')
    if (req.method === 'GET' && u.pathname === '/_fake/health') return sendJson(res, 200, { ok: true })
    if (req.method === 'GET' && u.pathname === '/_fake/forecast/state') return sendJson(res, 200, { settings, requests })
    if (req.method === 'POST' && u.pathname === '/_fake/forecast/set') {
      const b = await readJson(req)
      const problem = validSettings(b)
      if (problem) return sendJson(res, 400, { error: problem })
      settings = { default: b.default, points: (b.points ?? []).map((p) => ({ lat: p.lat, lon: p.lon, cloudCoverPct: p.cloudCoverPct })) }
      return sendJson(res, 200, { settings })
    }
    if (req.method === 'POST' && u.pathname === '/_fake/forecast/reset') { settings = null; return sendJson(res, 200, { settings }) }
    if (req.method === 'GET' && u.pathname === '/v1/forecast') {
      const q = parseForecastQuery(u.searchParams, Date.now())
      // The real service answers a bad request with 400 and a JSON reason (the SDK throws it).
      if ('reason' in q) return sendJson(res, 400, { error: true, reason: q.reason })
      requests++
      // The demo pattern is revised once an hour (of this machine's clock), like a real forecast.
      const issueMs = Math.floor(Date.now() / 3_600_000) * 3_600_000
      const body = buildForecastResponse(q, (lat, lon, hourMs, layer) => cloudFor(settings, lat, lon, hourMs, layer, issueMs))
      res.writeHead(200, { 'content-type': 'application/octet-stream' })
      return res.end(body)
    }
    sendJson(res, 404, { error: true, reason: 'not found' })
  } catch (e) {
    sendJson(res, 400, { error: true, reason: e instanceof Error ? e.message : String(e) })
  }
})

server.listen(PORT, '127.0.0.1', () => console.log(`forecast fake on http://127.0.0.1:${PORT}`))
for (const sig of ['SIGTERM', 'SIGINT']) process.on(sig, () => server.close(() => process.exit(0)))
