import { tile, TILE_MAX_ZOOM } from '../../../../services/tiles'

/** GET /tiles/{z}/{x}/{y}.pbf — basemap vector tiles. */
export default defineEventHandler(async (event) => {
  await rateLimit(event, `tiles:${clientIp(event)}`, Number(process.env.UMBRAFIELD_TILE_LIMIT || 3000), 60_000)
  const { z, x, y } = getRouterParams(event)
  const m = /^(\d+)\.pbf$/.exec(y ?? '')
  const zi = Number(z), xi = Number(x)
  if (!m || !Number.isInteger(zi) || !Number.isInteger(xi) || zi < 0 || zi > TILE_MAX_ZOOM) {
    throw createError({ statusCode: 400, statusMessage: 'Bad tile address', data: { fields: { tile: `expected /tiles/0–${TILE_MAX_ZOOM}/x/y.pbf` } } })
  }
  const yi = Number(m[1])
  const n = 2 ** zi
  if (xi >= n || yi >= n) throw createError({ statusCode: 404, statusMessage: 'No such tile' })
  setResponseHeaders(event, { 'Content-Type': 'application/x-protobuf', 'Cache-Control': 'public, max-age=86400' })
  return Buffer.from(tile(zi, xi, yi))
})
