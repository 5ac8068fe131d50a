import { mapStyle } from '../../services/mapStyle'

/** GET /map/style.json — Umbrafield's basemap style; tiles from this server, no glyph or sprite server needed. */
export default defineEventHandler((event) => {
  setResponseHeader(event, 'Cache-Control', 'public, max-age=3600')
  return mapStyle(getRequestURL(event).origin)
})
