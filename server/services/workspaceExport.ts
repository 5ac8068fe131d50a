import type { H3Event } from 'h3'
import type { Kysely } from 'kysely'
import type { Database } from '../database/schema'
import { eclipsePathFor } from './eclipses'
import { toCsv, toGeoJson, toGpx, toKml } from './exports'
import { getWorkspace, listSites } from './planning'

const TYPES = {
  geojson: 'application/geo+json',
  kml: 'application/vnd.google-earth.kml+xml',
  gpx: 'application/gpx+xml',
  csv: 'text/csv; charset=utf-8',
} as const

/** The path and the sites of a workspace as a download in one of four formats. */
export async function exportWorkspace(event: H3Event, db: Kysely<Database>, id: number, format: keyof typeof TYPES) {
  const ws = await getWorkspace(db, id)
  const sites = await listSites(db, id)
  const path = await eclipsePathFor(db, ws.eclipse_id, { step: 300 })
  const base = `umbrafield-${ws.eclipse_id}-${ws.name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '')}`
  setResponseHeaders(event, {
    'Content-Type': TYPES[format],
    'Content-Disposition': `attachment; filename="${base}.${format}"`,
  })
  const title = `${ws.name} — eclipse ${ws.eclipse_id}`
  if (format === 'geojson') return JSON.stringify(toGeoJson(title, path, sites))
  if (format === 'kml') return toKml(title, path, sites)
  if (format === 'gpx') return toGpx(title, sites)
  return toCsv(sites)
}
