import type { Kysely } from 'kysely'
import { sampleGrid } from '../../shared/climate/grid'
import { cloudColour, CLOUD_RAMP } from '../../shared/climate/ramp'
import type { Database } from '../database/schema'
import { cloudAt, eclipseMonth, workspaceGrids } from './climatology'
import { eclipsePathFor } from './eclipses'
import { getWorkspace } from './planning'

/** Extra distance (km) beyond the central path's half-width over which the cloud layer is drawn. */
export const CLOUD_BAND_KM = 300

function approxKm(lat1: number, lon1: number, lat2: number, lon2: number) {
  const x = (lon2 - lon1) * Math.cos(((lat1 + lat2) / 2) * (Math.PI / 180))
  return Math.hypot(x, lat2 - lat1) * 111.2
}

/** The workspace's climatology for the eclipse month, as cells clipped to a band around the path, plus a centreline profile. */
export async function cloudLayer(db: Kysely<Database>, workspaceId: number) {
  const ws = await getWorkspace(db, workspaceId)
  if (!ws.climatology_id) return null
  const month = eclipseMonth(ws.eclipse_id)
  const g = await workspaceGrids(db, ws)
  if (!g) return { month, demo: false, name: '', cells: { type: 'FeatureCollection', features: [] }, profile: [], legend: CLOUD_RAMP, note: `no data for month ${month}` }
  const path = await eclipsePathFor(db, ws.eclipse_id, { step: 120, wrap: 'split' })
  const centre = path.features.filter((f) => f.properties.kind === 'tick' && f.properties.line === 'centre')
    .map((f) => ({ lon: (f.geometry as { coordinates: number[] }).coordinates[0]!, lat: (f.geometry as { coordinates: number[] }).coordinates[1]!, utc: String(f.properties.utc), halfKm: Number(f.properties.pathWidthKm ?? 0) / 2 }))
  const { cloud } = g
  const features: unknown[] = []
  for (let i = 0; i < cloud.nlat; i++) {
    const lat = cloud.lat0 + i * cloud.dlat
    for (let j = 0; j < cloud.nlon; j++) {
      const v = cloud.values[i * cloud.nlon + j] as number
      if (Number.isNaN(v)) continue
      const lon = cloud.lon0 + j * cloud.dlon
      const lonW = lon > 180 ? lon - 360 : lon
      if (!centre.some((c) => approxKm(lat, lonW, c.lat, c.lon) < c.halfKm + CLOUD_BAND_KM)) continue
      const h = cloud.dlat / 2, w = cloud.dlon / 2
      features.push({
        type: 'Feature',
        geometry: { type: 'Polygon', coordinates: [[[lonW - w, lat - h], [lonW + w, lat - h], [lonW + w, lat + h], [lonW - w, lat + h], [lonW - w, lat - h]]] },
        properties: { cloudPct: Math.round(v * 10) / 10, color: cloudColour(v) },
      })
    }
  }
  const profile = centre.map((c) => {
    const s = cloudAt(g, c.lat, c.lon)
    return { utc: c.utc, lat: c.lat, lon: c.lon, cloudPct: s.cloudPct, pClear: s.pClear }
  }).filter((p) => p.cloudPct !== null || sampleGrid(cloud, p.lat, p.lon).method !== 'outside grid')
  return {
    month, name: g.meta.name, source: g.meta.source, demo: !!g.meta.demo,
    cells: { type: 'FeatureCollection', features }, profile, legend: CLOUD_RAMP,
  }
}
