import type { Kysely, Selectable } from 'kysely'
import Papa from 'papaparse'
import { CLOUD_WEIGHTS_DEFAULT, pClearOf, sampleGrid, type CloudWeights, type Grid } from '../../shared/climate/grid'
import { NO_CLIMATOLOGY, type SiteCloud } from '../../shared/schemas/sites'
import type { Database, SiteRow, User } from '../database/schema'
import { audit } from './audit'
import { MAX_GRID_CELLS, openGeoTiff, RasterError } from './geotiff'

/** The cloud figures for a site, from the workspace's climatology (or the manual override). */
export type CloudLookup = (site: SiteRow) => SiteCloud

/** Upload limit for climatology files. */
export const MAX_CLIMATOLOGY_BYTES = 25 * 1024 * 1024

/** A climatology file that cannot be used (a raster's own problems are the same class). */
export const ClimatologyError = RasterError
export type ClimatologyError = RasterError

export interface DatasetMeta {
  name: string
  source: string
  licence?: string
  years?: string
  timeOfDay?: string
  demo?: boolean
}

interface ParsedGrid {
  format: 'geotiff' | 'csv'
  lat0: number; lon0: number; dlat: number; dlon: number; nlat: number; nlon: number
  months: Map<number, { cloud: Float32Array; clear?: Float32Array; scattered?: Float32Array; broken?: Float32Array }>
}

const blob = (a?: Float32Array) => (a ? Buffer.from(a.buffer, a.byteOffset, a.byteLength) : null)
export { MAX_GRID_CELLS }

const floats = (b: Buffer | null) => (b ? new Float32Array(b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength)) : undefined)

function checkMonth(m: number, where: string): number {
  if (!Number.isInteger(m) || m < 1 || m > 12) throw new ClimatologyError(`${where}: month must be a whole number 1–12, got "${m}"`)
  return m
}

/**
 * A single-band GeoTIFF of cloud fraction (0–1) or percent (0–100), one month (`month` given),
 * or a 12-band file (bands = January…December). Must be a regular lat/lon grid in EPSG:4326.
 */
export async function parseGeoTiff(buf: Buffer, month?: number): Promise<ParsedGrid> {
  const { image, width, height, bands, lat0, lon0, dlat, dlon, northUp, nodata } = await openGeoTiff(buf)
  if (bands !== 1 && bands !== 12) throw new ClimatologyError(`Expected 1 band (one month) or 12 bands (one per month), found ${bands}`)
  if (bands === 1 && month === undefined) throw new ClimatologyError('Choose the month this single-band file represents')
  if (bands === 1) checkMonth(month!, 'month')
  // Cloud is read between cell centres (bilinear), which needs two of them each way.
  if (width < 2 || height < 2) throw new ClimatologyError(`The grid needs at least 2 × 2 cells, this one has ${width} × ${height}`)
  const rasters = await image.readRasters({ interleave: false }) as unknown as ArrayLike<number>[]
  const scaleAll = rasters.every((band) => {
    for (let k = 0; k < band.length; k++) { const v = band[k]!; if (v !== nodata && !Number.isNaN(v) && v > 1) return false }
    return true
  })
  const months: ParsedGrid['months'] = new Map()
  rasters.forEach((band, b) => {
    const out = new Float32Array(width * height)
    let valid = 0
    for (let r = 0; r < height; r++) {
      const row = northUp ? height - 1 - r : r
      for (let c = 0; c < width; c++) {
        const v = band[r * width + c]!
        if ((nodata !== null && v === nodata) || Number.isNaN(v)) { out[row * width + c] = Number.NaN; continue }
        const pct = scaleAll ? v * 100 : v
        if (pct < 0 || pct > 100) throw new ClimatologyError(`Value out of range at row ${r + 1}, column ${c + 1}: ${v} (expected a fraction 0–1 or percent 0–100)`)
        out[row * width + c] = pct
        valid++
      }
    }
    if (!valid) throw new ClimatologyError(bands === 12 ? `The grid has no data: month ${b + 1} has no data in any cell` : 'The grid has no data: every cell is no-data')
    months.set(bands === 12 ? b + 1 : month!, { cloud: out })
  })
  return { format: 'geotiff', lat0, lon0, dlat, dlon, nlat: height, nlon: width, months }
}

/** CSV grid: lat,lon,month,cloud_pct[,clear_pct,scattered_pct,broken_pct]; every month a complete regular grid. */
export function parseCsvGrid(text: string): ParsedGrid {
  const parsed = Papa.parse<Record<string, string>>(text.replace(/^\uFEFF/, ''), { header: true, skipEmptyLines: 'greedy' })
  const cols = (parsed.meta.fields ?? []).map((c) => c.trim().toLowerCase())
  for (const need of ['lat', 'lon', 'month', 'cloud_pct']) if (!cols.includes(need)) throw new ClimatologyError(`Missing column "${need}" (need lat, lon, month, cloud_pct)`)
  const cats = ['clear_pct', 'scattered_pct', 'broken_pct']
  const hasCats = cats.every((c) => cols.includes(c))
  if (!hasCats && cats.some((c) => cols.includes(c))) throw new ClimatologyError('Give all three of clear_pct, scattered_pct and broken_pct, or none')
  const recs: Array<{ lat: number; lon: number; month: number; cloud: number; clear?: number; scattered?: number; broken?: number }> = []
  parsed.data.forEach((raw, i) => {
    const rec: Record<string, string> = {}
    for (const [k, v] of Object.entries(raw)) rec[k.trim().toLowerCase()] = (v ?? '').trim()
    const row = i + 2
    const n = (k: string, min: number, max: number) => {
      const s = rec[k] ?? ''
      if (!/^[-+]?\d+(\.\d+)?$/.test(s)) throw new ClimatologyError(`Row ${row}: ${k} must be a number, got "${s}"`)
      const v = Number(s)
      if (v < min || v > max) throw new ClimatologyError(`Row ${row}: ${k} out of range (${min}–${max}): ${v}`)
      return v
    }
    const month = Number(rec.month)
    checkMonth(month, `Row ${row}`)
    const r = { lat: n('lat', -90, 90), lon: n('lon', -180, 360), month, cloud: n('cloud_pct', 0, 100) }
    if (hasCats) {
      const c = { clear: n('clear_pct', 0, 100), scattered: n('scattered_pct', 0, 100), broken: n('broken_pct', 0, 100) }
      if (c.clear + c.scattered + c.broken > 100.5) throw new ClimatologyError(`Row ${row}: clear + scattered + broken exceed 100 %`)
      Object.assign(r, c)
    }
    recs.push(r)
  })
  if (recs.length === 0) throw new ClimatologyError('The file has no grid rows')
  const axis = (vals: number[], name: string) => {
    const u = [...new Set(vals.map((v) => Math.round(v * 1e6) / 1e6))].sort((a, b) => a - b)
    if (u.length < 2) throw new ClimatologyError(`Ragged grid: need at least two distinct ${name} values`)
    const step = u[1]! - u[0]!
    for (let k = 2; k < u.length; k++) {
      if (Math.abs(u[k]! - u[k - 1]! - step) > 1e-4) throw new ClimatologyError(`Ragged grid: ${name} spacing is not regular (${u[k - 1]} → ${u[k]})`)
    }
    return { start: u[0]!, step, n: u.length }
  }
  const la = axis(recs.map((r) => r.lat), 'latitude')
  const lo = axis(recs.map((r) => r.lon), 'longitude')
  // Rows against cells before allocating: every month must be a complete grid, so a file whose
  // axes span far more cells than it has rows (a "diagonal" of points) is ragged, and refused here.
  const monthsInFile = new Set(recs.map((r) => r.month)).size
  // (A few missing cells get the detailed message below; a file with fewer than half the rows it needs is refused at once.)
  if (la.n * lo.n * monthsInFile > 2 * recs.length) throw new ClimatologyError(`Ragged grid: ${la.n} latitudes × ${lo.n} longitudes × ${monthsInFile} month(s) need ${la.n * lo.n * monthsInFile} rows, the file has ${recs.length}`)
  if (la.n * lo.n * monthsInFile > MAX_GRID_CELLS) throw new ClimatologyError(`The grid is too large: at most ${MAX_GRID_CELLS.toLocaleString('en')} cells`)
  const months: ParsedGrid['months'] = new Map()
  const seen = new Map<number, Uint8Array>()
  for (const r of recs) {
    if (!months.has(r.month)) {
      const size = la.n * lo.n
      const nan = () => new Float32Array(size).fill(Number.NaN)
      months.set(r.month, { cloud: nan(), ...(hasCats ? { clear: nan(), scattered: nan(), broken: nan() } : {}) })
      seen.set(r.month, new Uint8Array(size))
    }
    const i = Math.round((r.lat - la.start) / la.step)
    const j = Math.round((r.lon - lo.start) / lo.step)
    const k = i * lo.n + j
    const s = seen.get(r.month)!
    if (s[k]) throw new ClimatologyError(`Ragged grid: duplicate cell at ${r.lat}, ${r.lon} for month ${r.month}`)
    s[k] = 1
    const m = months.get(r.month)!
    m.cloud[k] = r.cloud
    if (hasCats) { m.clear![k] = r.clear!; m.scattered![k] = r.scattered!; m.broken![k] = r.broken! }
  }
  for (const [month, s] of seen) {
    const holes = s.reduce((a, v) => a + (v ? 0 : 1), 0)
    if (holes) throw new ClimatologyError(`Ragged grid: month ${month} is missing ${holes} of ${s.length} cells`)
  }
  return { format: 'csv', lat0: la.start, lon0: lo.start, dlat: la.step, dlon: lo.step, nlat: la.n, nlon: lo.n, months }
}

/** Stores a parsed dataset in one transaction: all months or nothing. */
export async function storeDataset(db: Kysely<Database>, user: User | null, meta: DatasetMeta, g: ParsedGrid): Promise<number> {
  return db.transaction().execute(async (trx) => {
    const hasCats = [...g.months.values()].some((m) => !!m.clear)
    const d = await trx.insertInto('climatology_datasets').values({
      name: meta.name, source: meta.source, licence: meta.licence ?? '', years: meta.years ?? '', time_of_day: meta.timeOfDay ?? '',
      demo: meta.demo ? 1 : 0, format: g.format, lat0: g.lat0, lon0: g.lon0, dlat: g.dlat, dlon: g.dlon, nlat: g.nlat, nlon: g.nlon,
      has_categories: hasCats ? 1 : 0, created_by: user?.id ?? null,
    }).returning('id').executeTakeFirstOrThrow()
    for (const [month, m] of g.months) {
      await trx.insertInto('climatology_grids').values({
        dataset_id: d.id, month, cloud_pct: blob(m.cloud)!, clear_pct: blob(m.clear), scattered_pct: blob(m.scattered), broken_pct: blob(m.broken),
      }).execute()
    }
    if (user) await audit(trx, { action: 'climatology_import', actorUserId: user.id, detail: { datasetId: d.id, name: meta.name, months: [...g.months.keys()] } })
    return d.id
  })
}

/**
 * The datasets the caller may see: all of them for organisers; for a guide, only those chosen by a
 * planning workspace of a trip they guide (the same reach as their workspaces).
 */
export async function listDatasets(db: Kysely<Database>, user: Pick<User, 'id' | 'role'>) {
  let q = db.selectFrom('climatology_datasets').selectAll().orderBy('id')
  if (user.role !== 'organiser') {
    q = q.where('id', 'in', db.selectFrom('workspaces').innerJoin('trips', 'trips.workspace_id', 'workspaces.id')
      .innerJoin('trip_guides', 'trip_guides.trip_id', 'trips.id').select('workspaces.climatology_id')
      .where('trip_guides.user_id', '=', user.id).where('workspaces.climatology_id', 'is not', null).$narrowType<{ climatology_id: number }>())
  }
  const rows = await q.execute()
  const months = await db.selectFrom('climatology_grids').select(['dataset_id', 'month']).execute()
  return rows.map((d) => ({
    id: d.id, name: d.name, source: d.source, licence: d.licence, years: d.years, timeOfDay: d.time_of_day, demo: !!d.demo,
    format: d.format, resolutionDeg: { lat: d.dlat, lon: d.dlon }, hasCategories: !!d.has_categories,
    bounds: { south: d.lat0 - d.dlat / 2, north: d.lat0 + d.dlat * (d.nlat - 0.5), west: d.lon0 - d.dlon / 2, east: d.lon0 + d.dlon * (d.nlon - 0.5) },
    months: months.filter((m) => m.dataset_id === d.id).map((m) => m.month).sort((a, b) => a - b),
  }))
}

export interface MonthGrids { meta: Selectable<Database['climatology_datasets']>; cloud: Grid; clear?: Grid; scattered?: Grid; broken?: Grid; weights?: CloudWeights }

/** The workspace's P(clear) weights (its own, validated when set, or the published ones). */
export function cloudWeightsOf(ws: Pick<Selectable<Database['workspaces']>, 'cloud_weight_scattered' | 'cloud_weight_broken'>): CloudWeights {
  return ws.cloud_weight_scattered === null || ws.cloud_weight_broken === null || ws.cloud_weight_scattered === undefined || ws.cloud_weight_broken === undefined
    ? CLOUD_WEIGHTS_DEFAULT : { scattered: Number(ws.cloud_weight_scattered), broken: Number(ws.cloud_weight_broken) }
}

/** A workspace's month grids: the shared cached grids with the workspace's weights beside them (the cache is never changed). */
export async function workspaceGrids(db: Kysely<Database>, ws: Selectable<Database['workspaces']>): Promise<MonthGrids | null> {
  const g = ws.climatology_id ? await monthGrids(db, ws.climatology_id, eclipseMonth(ws.eclipse_id)) : null
  return g ? { ...g, weights: cloudWeightsOf(ws) } : null
}

const gridCache = new Map<string, MonthGrids | null>()

export async function monthGrids(db: Kysely<Database>, datasetId: number, month: number): Promise<MonthGrids | null> {
  const key = `${datasetId}:${month}`
  if (gridCache.has(key)) return gridCache.get(key)!
  const meta = await db.selectFrom('climatology_datasets').selectAll().where('id', '=', datasetId).executeTakeFirst()
  const row = meta && await db.selectFrom('climatology_grids').selectAll().where('dataset_id', '=', datasetId).where('month', '=', month).executeTakeFirst()
  let out: MonthGrids | null = null
  if (meta && row) {
    const g = (values?: Float32Array): Grid | undefined => (values ? { lat0: meta.lat0, lon0: meta.lon0, dlat: meta.dlat, dlon: meta.dlon, nlat: meta.nlat, nlon: meta.nlon, values } : undefined)
    out = { meta, cloud: g(floats(row.cloud_pct))!, clear: g(floats(row.clear_pct)), scattered: g(floats(row.scattered_pct)), broken: g(floats(row.broken_pct)) }
  }
  gridCache.set(key, out)
  return out
}

export function forgetDataset(id: number) {
  for (const k of gridCache.keys()) if (k.startsWith(`${id}:`)) gridCache.delete(k)
}

const r1 = (v: number) => Math.round(v * 10) / 10

/**
 * P(clear) at a point, unrounded, by the same rules as {@link cloudAt} (grids in 0–360° longitudes
 * included); null where the grid has no value. For surfaces and searches over many points.
 */
export function pClearSampler(g: MonthGrids): (lat: number, lon: number) => number | null {
  const cats = g.clear && g.scattered && g.broken ? { clear: g.clear, scattered: g.scattered, broken: g.broken } : null
  return (lat, lon) => {
    let lonUsed = lon
    let s = sampleGrid(g.cloud, lat, lon)
    if (s.value === null && lon < 0) { lonUsed = lon + 360; s = sampleGrid(g.cloud, lat, lonUsed) }
    if (s.value === null) return null
    if (cats) {
      const c = sampleGrid(cats.clear, lat, lonUsed).value, sc = sampleGrid(cats.scattered, lat, lonUsed).value, b = sampleGrid(cats.broken, lat, lonUsed).value
      if (c !== null && sc !== null && b !== null) return pClearOf(s.value, { clear: c, scattered: sc, broken: b }, g.weights).pClear
    }
    return pClearOf(s.value).pClear
  }
}

/** Cloud figures at a point from one month's grids. */
export function cloudAt(g: MonthGrids, lat: number, lon: number): SiteCloud {
  const label = `${g.meta.name}${g.meta.demo ? ' (Demo data — not a real climatology)' : ''}`
  let s = sampleGrid(g.cloud, lat, lon)
  if (s.value === null && lon < 0) s = sampleGrid(g.cloud, lat, lon + 360) // grids given in 0–360° longitudes
  if (s.value === null) return { ...NO_CLIMATOLOGY, cloudSource: label, cloudNote: s.method === 'outside grid' ? 'site is outside the climatology grid' : 'no data near this site' }
  const lonUsed = sampleGrid(g.cloud, lat, lon).value === null ? lon + 360 : lon
  let cats: { clear: number; scattered: number; broken: number } | undefined
  if (g.clear && g.scattered && g.broken) {
    const c = sampleGrid(g.clear, lat, lonUsed).value, sc = sampleGrid(g.scattered, lat, lonUsed).value, b = sampleGrid(g.broken, lat, lonUsed).value
    if (c !== null && sc !== null && b !== null) cats = { clear: c, scattered: sc, broken: b }
  }
  const p = pClearOf(s.value, cats, g.weights)
  return { cloudPct: r1(s.value), pClear: Math.round(p.pClear * 1000) / 1000, pClearMethod: p.method, cloudSource: label, cloudNote: s.method }
}

/** A manual override wins over the climatology and says so. */
export function overrideCloud(site: Pick<SiteRow, 'cloud_override_pct' | 'cloud_override_note'>): SiteCloud | null {
  if (site.cloud_override_pct === null || site.cloud_override_pct === undefined) return null
  const p = pClearOf(site.cloud_override_pct)
  return {
    cloudPct: site.cloud_override_pct, pClear: Math.round(p.pClear * 1000) / 1000, pClearMethod: p.method,
    cloudSource: `manual override: ${site.cloud_override_note ?? ''}`.trim(), cloudNote: 'manual override',
  }
}

/** Month (1–12) of an eclipse id YYYY-MM-DD. */
export const eclipseMonth = (eclipseId: string) => Number(eclipseId.slice(5, 7))

/** Cloud lookup for a workspace's sites: override first, then the chosen dataset's eclipse month. */
export async function cloudLookupFor(db: Kysely<Database>, ws: Selectable<Database['workspaces']>): Promise<CloudLookup> {
  const grids = await workspaceGrids(db, ws)
  return (site) => {
    const o = overrideCloud(site)
    if (o) return o
    if (!ws.climatology_id) return NO_CLIMATOLOGY
    if (!grids) return { ...NO_CLIMATOLOGY, cloudNote: `the chosen climatology has no data for month ${eclipseMonth(ws.eclipse_id)}` }
    return cloudAt(grids, site.lat, site.lon)
  }
}
