import type { Kysely } from 'kysely'
import { sampleGrid, type Grid } from '../../shared/climate/grid'
import { deltaTHourAngleRad, elementsAt, observerAt, observerOf, refractionDeg, sunAltAz } from '../../shared/eclipse/besselian'
import { utcMsToT } from '../../shared/eclipse/time'
import type { BesselianElements } from '../../shared/eclipse/types'
import { horizonAlong, SUN_SEMIDIAMETER_DEG, TERRAIN_WARNING_DEG, type HeightModel } from '../../shared/geo/horizon'
import type { HorizonContactOut, SiteHorizonOut } from '../../shared/schemas/sites'
import type { Database, User } from '../database/schema'
import type { LocalReport } from '../eclipse/report'
import { audit } from './audit'
import { openGeoTiff, RasterError } from './geotiff'

/** Upload limit for terrain files: the same as for climatologies. */
export const MAX_TERRAIN_BYTES = 25 * 1024 * 1024
/** An observer's eye above the ground when the height comes from the model, m (common practice: a standing adult). */
export const EYE_HEIGHT_M = 1.7

export interface ParsedTerrain { lat0: number; lon0: number; dlat: number; dlon: number; nlat: number; nlon: number; heights: Float32Array; minM: number; maxM: number }

/**
 * A single-band GeoTIFF of heights in metres (EPSG:4326), such as an SRTM or Copernicus DEM tile.
 * No-data cells become NaN. Heights outside −500…9000 m are refused (probably not metres).
 */
export async function parseTerrainTiff(buf: Buffer): Promise<ParsedTerrain> {
  const { image, width, height, bands, lat0, lon0, dlat, dlon, northUp, nodata } = await openGeoTiff(buf)
  if (bands !== 1) throw new RasterError(`Expected one band of heights in metres, found ${bands}`)
  if (width < 2 || height < 2) throw new RasterError('The height model needs at least 2 × 2 cells')
  const [band] = await image.readRasters({ interleave: false }) as unknown as ArrayLike<number>[]
  const heights = new Float32Array(width * height)
  let minM = Infinity, maxM = -Infinity, valid = 0
  for (let r = 0; r < height; r++) {
    const row = northUp ? height - 1 - r : r
    for (let c = 0; c < width; c++) {
      const v = band![r * width + c]!
      if ((nodata !== null && v === nodata) || Number.isNaN(v) || v <= -32767) { heights[row * width + c] = Number.NaN; continue }
      if (v < -500 || v > 9000) throw new RasterError(`Height out of range at row ${r + 1}, column ${c + 1}: ${v} (expected metres, −500 to 9000)`)
      heights[row * width + c] = v
      valid++
      minM = Math.min(minM, v)
      maxM = Math.max(maxM, v)
    }
  }
  if (!valid) throw new RasterError('The height model has no data')
  return { lat0, lon0, dlat, dlon, nlat: height, nlon: width, heights, minM, maxM }
}

const blob = (a: Float32Array) => Buffer.from(a.buffer, a.byteOffset, a.byteLength)

/** Stores a parsed model for a workspace, in one transaction. */
export async function storeTerrain(db: Kysely<Database>, user: User, workspaceId: number, name: string, t: ParsedTerrain): Promise<number> {
  const id = await db.transaction().execute(async (trx) => {
    const r = await trx.insertInto('terrain_models').values({
      workspace_id: workspaceId, name, lat0: t.lat0, lon0: t.lon0, dlat: t.dlat, dlon: t.dlon, nlat: t.nlat, nlon: t.nlon,
      min_m: t.minM, max_m: t.maxM, heights: blob(t.heights), created_by: user.id,
    }).returning('id').executeTakeFirstOrThrow()
    await audit(trx, { action: 'terrain_import', actorUserId: user.id, detail: { workspaceId, terrainId: r.id, name, cells: t.nlat * t.nlon } })
    return r.id
  })
  return id
}

export async function listTerrain(db: Kysely<Database>, workspaceId: number) {
  const rows = await db.selectFrom('terrain_models').select(['id', 'name', 'lat0', 'lon0', 'dlat', 'dlon', 'nlat', 'nlon', 'min_m', 'max_m', 'created_at'])
    .where('workspace_id', '=', workspaceId).orderBy('id', 'desc').execute()
  return rows.map((r) => ({
    id: r.id, name: r.name, createdAt: r.created_at, minM: r.min_m, maxM: r.max_m,
    resolutionDeg: { lat: r.dlat, lon: r.dlon }, cells: r.nlat * r.nlon,
    bounds: { south: r.lat0 - r.dlat / 2, north: r.lat0 + r.dlat * (r.nlat - 0.5), west: r.lon0 - r.dlon / 2, east: r.lon0 + r.dlon * (r.nlon - 0.5) },
  }))
}

/** The workspace's height models as one sampler (newest model first where they overlap), with its name. */
export interface Terrain extends HeightModel { name: string }

/** Models by workspace, with the ids they were built from: another instance may have added one since. */
const terrainCache = new Map<number, { ids: string; terrain: Terrain | null }>()

export async function terrainFor(db: Kysely<Database>, workspaceId: number): Promise<Terrain | null> {
  const ids = (await db.selectFrom('terrain_models').select('id').where('workspace_id', '=', workspaceId).orderBy('id', 'desc').execute()).map((r) => r.id).join(',')
  const hit = terrainCache.get(workspaceId)
  if (hit && hit.ids === ids) return hit.terrain
  if (!ids) { terrainCache.set(workspaceId, { ids, terrain: null }); return null }
  const rows = await db.selectFrom('terrain_models').selectAll().where('workspace_id', '=', workspaceId).orderBy('id', 'desc').execute()
  let out: Terrain | null = null
  if (rows.length) {
    const grids: Grid[] = rows.map((r) => ({
      lat0: r.lat0, lon0: r.lon0, dlat: r.dlat, dlon: r.dlon, nlat: r.nlat, nlon: r.nlon,
      values: new Float32Array(r.heights.buffer.slice(r.heights.byteOffset, r.heights.byteOffset + r.heights.byteLength)),
    }))
    const heightAt = (lat: number, lon: number): number | null => {
      for (const g of grids) {
        const fi = (lat - g.lat0) / g.dlat, fj = (lon - g.lon0) / g.dlon
        if (fi < -0.5 || fj < -0.5 || fi > g.nlat - 0.5 || fj > g.nlon - 0.5) continue
        const s = sampleGrid(g, lat, lon)
        if (s.value !== null) return s.value
      }
      return null
    }
    const cellKm = Math.min(...rows.map((r) => r.dlat * 111.2))
    out = { name: rows[0]!.name, heightAt, cellKm }
  }
  terrainCache.set(workspaceId, { ids: rows.map((r) => r.id).join(','), terrain: out })
  return out
}

const r1 = (v: number) => Math.round(v * 10) / 10
const r2 = (v: number) => Math.round(v * 100) / 100

/**
 * The terrain horizon for a site at C2, maximum and C3 (null for a contact the site does not have),
 * a profile across the Sun's path in the sky from C1 to C4, and the Sun's track over it. Null when
 * no model covers the site.
 */
export function siteHorizon(terrain: Terrain | null, el: BesselianElements, r: LocalReport, site: { lat: number; lon: number; elevationM: number },
  opts: { profile?: boolean } = {}): SiteHorizonOut | null {
  if (!terrain) return null
  const ground = terrain.heightAt(site.lat, site.lon)
  if (ground === null) return null
  // The organiser's height wins; a blank (0) height takes the model's ground plus eye height.
  const fromSite = site.elevationM !== 0
  const observerHeightM = fromSite ? site.elevationM : ground + EYE_HEIGHT_M
  const at = (k: 'c1' | 'c2' | 'max' | 'c3' | 'c4'): HorizonContactOut | null => {
    const c = r[k]
    if (!c) return null
    const h = horizonAlong(terrain, site.lat, site.lon, observerHeightM, c.azimuthDeg)
    const terrainAltitudeDeg = h ? h.altitudeDeg : -Infinity
    const margin = c.apparentAltitudeDeg - terrainAltitudeDeg
    return {
      sunAltitudeDeg: c.apparentAltitudeDeg, terrainAltitudeDeg: h ? r2(terrainAltitudeDeg) : -90, marginDeg: h ? r2(margin) : 90,
      clear: margin > SUN_SEMIDIAMETER_DEG, close: margin < TERRAIN_WARNING_DEG, azimuthDeg: c.azimuthDeg, distanceKm: h ? r1(h.distanceKm) : 0,
    }
  }
  // The Sun's track from C1 to C4, every 5 minutes and at each contact.
  const clock = r.time.ttMinusUtcSec ?? r.time.deltaTSec
  const o = observerOf({ latDeg: site.lat, lonDeg: site.lon, elevationM: observerHeightM })
  const dH = deltaTHourAngleRad(r.time.deltaTSec)
  const sunAt = (utcMs: number) => {
    const t = utcMsToT(el, utcMs, clock)
    const st = elementsAt(el, t)
    const { altitudeDeg, azimuthDeg } = sunAltAz(st, o, observerAt(el, st, o, dH).H)
    return { utc: new Date(utcMs).toISOString(), altitudeDeg: r2(altitudeDeg + refractionDeg(altitudeDeg)), azimuthDeg: r2(azimuthDeg) }
  }
  // The profile and the Sun's track are for drawing; the timetable's warnings need only the contacts.
  const first = opts.profile === false ? undefined : r.c1 ?? r.max
  const last = r.c4 ?? r.max
  const sunTrack: Array<{ utc: string; altitudeDeg: number; azimuthDeg: number; label?: string }> = []
  if (first && last) {
    const a = Date.parse(first.utc), b = Date.parse(last.utc)
    for (let u = a; u < b; u += 300_000) sunTrack.push(sunAt(u))
    sunTrack.push(sunAt(b))
    for (const k of ['c1', 'c2', 'max', 'c3', 'c4'] as const) {
      const c = r[k]
      if (c) sunTrack.push({ ...sunAt(Date.parse(c.utc)), label: k === 'max' ? 'max' : k.toUpperCase() })
    }
    sunTrack.sort((p, q) => p.utc.localeCompare(q.utc))
  }
  const azs = sunTrack.map((p) => p.azimuthDeg)
  const profile: Array<{ azimuthDeg: number; altitudeDeg: number }> = []
  if (azs.length) {
    // Unwrapped azimuth span of the track, plus 15° each side, in 1° steps.
    const unwrapped = azs.map((z) => (z - azs[0]! > 180 ? z - 360 : z - azs[0]! < -180 ? z + 360 : z))
    const lo = Math.floor(Math.min(...unwrapped) - 15), hi = Math.ceil(Math.max(...unwrapped) + 15)
    for (let z = lo; z <= hi; z++) {
      const h = horizonAlong(terrain, site.lat, site.lon, observerHeightM, ((z % 360) + 360) % 360)
      profile.push({ azimuthDeg: z, altitudeDeg: h ? r2(h.altitudeDeg) : 0 })
    }
  }
  return {
    c1: at('c1'), c2: at('c2'), max: at('max'), c3: at('c3'), c4: at('c4'),
    source: `terrain model "${terrain.name}"; curvature and terrestrial refraction k = 0.13 for the terrain, Sæmundsson's refraction for the Sun`,
    observerHeightM: r1(observerHeightM),
    heightSource: fromSite ? 'site' as const : 'model' as const,
    groundHeightM: r1(ground),
    profile, sunTrack,
  }
}

/** Timetable lines for every contact (C1 to C4 and maximum) where the Sun is within 2° of the terrain or behind it. */
export function terrainWarnings(h: SiteHorizonOut | null): string[] {
  if (!h) return []
  const out: string[] = []
  for (const [k, label] of [['c1', 'C1'], ['c2', 'C2'], ['max', 'maximum'], ['c3', 'C3'], ['c4', 'C4']] as const) {
    const c = h[k]
    if (!c || !c.close) continue
    out.push(c.clear
      ? `${label}: the Sun (${c.sunAltitudeDeg.toFixed(1)}°) is only ${c.marginDeg.toFixed(1)}° above the terrain at azimuth ${c.azimuthDeg.toFixed(0)}° (horizon set ${c.distanceKm.toFixed(1)} km away). Check the view on the ground.`
      : `${label}: the Sun (${c.sunAltitudeDeg.toFixed(1)}°) is behind the terrain at azimuth ${c.azimuthDeg.toFixed(0)}° (terrain at ${c.terrainAltitudeDeg.toFixed(1)}°, ${c.distanceKm.toFixed(1)} km away). Move the site.`)
  }
  return out
}
