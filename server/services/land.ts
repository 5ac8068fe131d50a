import { booleanPointInPolygon } from '@turf/turf'
import { readFileSync } from 'node:fs'
import { createRequire } from 'node:module'
import { feature } from 'topojson-client'
import type { GeometryCollection, Topology } from 'topojson-specification'

/**
 * Land and sea from Natural Earth 1:10m land (world-atlas, public domain), the same outlines the
 * basemap draws. Each polygon keeps its bounding box so a point is tested against few of them.
 */
interface LandPolygon { bbox: [number, number, number, number]; geometry: GeoJSON.Polygon }
let polygons: LandPolygon[] | null = null

function load(): LandPolygon[] {
  const path = createRequire(import.meta.url).resolve('world-atlas/land-10m.json')
  const topo = JSON.parse(readFileSync(path, 'utf8')) as Topology<{ land: GeometryCollection }>
  const fc = feature(topo, topo.objects.land) as unknown as GeoJSON.FeatureCollection
  const out: LandPolygon[] = []
  for (const f of fc.features) {
    const g = f.geometry
    const polys = g.type === 'Polygon' ? [g.coordinates] : g.type === 'MultiPolygon' ? g.coordinates : []
    for (const coordinates of polys) {
      let w = Infinity, s = Infinity, e = -Infinity, n = -Infinity
      for (const [x, y] of coordinates[0]!) { w = Math.min(w, x!); e = Math.max(e, x!); s = Math.min(s, y!); n = Math.max(n, y!) }
      out.push({ bbox: [w, s, e, n], geometry: { type: 'Polygon', coordinates } })
    }
  }
  return out
}

/** Whether a point (longitude −180..180) is on land. */
export function isLand(lat: number, lon: number): boolean {
  polygons ??= load()
  for (const p of polygons) {
    const [w, s, e, n] = p.bbox
    if (lon < w || lon > e || lat < s || lat > n) continue
    if (booleanPointInPolygon([lon, lat], p.geometry)) return true
  }
  return false
}

/** The land polygons whose bounding box meets [west, south, east, north] (rings as [lon, lat]; holes are lakes). */
export function landPolygonsIn(w: number, s: number, e: number, n: number): GeoJSON.Polygon[] {
  polygons ??= load()
  return polygons.filter((p) => !(p.bbox[2] < w || p.bbox[0] > e || p.bbox[3] < s || p.bbox[1] > n)).map((p) => p.geometry)
}
