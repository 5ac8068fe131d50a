import { writeArrayBuffer } from 'geotiff'
import { url } from '@nuxt/test-utils/e2e'
import { afterAll, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/database/connection'
import { ORGANISER, signIn, useApp } from './app'

// Every way an uploaded terrain model or cloud climatology can be unusable: each is refused with a
// message naming the reason, and nothing is stored. The GeoTIFFs are written here with geotiff's writer.
const { dbTarget } = await useApp()
const db = openDatabase(dbTarget)
afterAll(() => db.destroy())

/** Upload limit of both routes, bytes (MAX_TERRAIN_BYTES, MAX_CLIMATOLOGY_BYTES). */
const MAX_UPLOAD_BYTES = 25 * 1024 * 1024
/** The most cells a raster may declare (MAX_GRID_CELLS in server/services/geotiff.ts); a square just over it. */
const MAX_GRID_CELLS = 25_000_000
const OVER_SIDE = Math.floor(Math.sqrt(MAX_GRID_CELLS)) + 1
const tooManyCells = new RegExp(`too large: ${OVER_SIDE} × ${OVER_SIDE} × 1 cells`)

const NODATA = -9999

/**
 * A GeoTIFF in EPSG:4326 near Luxor, 0.01° cells, float32, `bands` values per cell (pixel-interleaved).
 * `keys` overrides or removes (undefined) the geo keys; `value(row, col, band)` gives each sample.
 */
function tiff(width: number, height: number, o: { bands?: number; value?: (r: number, c: number, b: number) => number; keys?: Record<string, unknown>; nodata?: boolean } = {}) {
  const bands = o.bands ?? 1
  const data = new Float32Array(width * height * bands)
  for (let r = 0; r < height; r++) for (let c = 0; c < width; c++) for (let b = 0; b < bands; b++) data[(r * width + c) * bands + b] = o.value ? o.value(r, c, b) : 20
  const meta = Object.fromEntries(Object.entries({
    width, height, GeographicTypeGeoKey: 4326, GTModelTypeGeoKey: 2, GTRasterTypeGeoKey: 1,
    ModelPixelScale: [0.01, 0.01, 0], ModelTiepoint: [0, 0, 0, 32.6, 25.7, 0], ...(o.nodata ? { GDAL_NODATA: `${NODATA}\0` } : {}), ...o.keys,
  }).filter(([, v]) => v !== undefined))
  return new Uint8Array(writeArrayBuffer(data, meta) as ArrayBuffer)
}

/**
 * A small, valid file whose header declares `width` × `height` cells: a raster that would not fit in
 * memory, caught from the header before anything is decoded.
 */
function declaredSize(width: number, height: number) {
  const bytes = tiff(2, 2)
  const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength)
  expect(String.fromCharCode(bytes[0]!, bytes[1]!)).toBe('MM') // geotiff writes big-endian
  const ifd = v.getUint32(4)
  for (let i = 0, n = v.getUint16(ifd); i < n; i++) {
    const e = ifd + 2 + i * 12
    const tag = v.getUint16(e)
    if (tag !== 256 && tag !== 257) continue
    const value = tag === 256 ? width : height
    if (v.getUint16(e + 2) === 3) v.setUint16(e + 8, value)
    else v.setUint32(e + 8, value)
  }
  return bytes
}

async function upload(path: string, fields: Record<string, string>, file: { name: string; data: Uint8Array | string }, cookie: string) {
  const form = new FormData()
  for (const [k, v] of Object.entries(fields)) form.append(k, v)
  form.append('file', new Blob([file.data as BlobPart]), file.name)
  const res = await fetch(url(path), { method: 'POST', body: form, headers: { cookie } })
  const text = await res.text()
  let body: any = text
  try { body = JSON.parse(text) } catch { /* not JSON */ }
  return { status: res.status, body }
}

const count = async (t: 'terrain_models' | 'climatology_datasets' | 'climatology_grids') =>
  Number((await db.selectFrom(t).select((eb) => eb.fn.countAll().as('n')).executeTakeFirstOrThrow()).n)

type Case = [what: string, file: Uint8Array, reason: RegExp]

describe('terrain upload errors', () => {
  const cases: Case[] = [
    ['several bands', tiff(4, 4, { bands: 3, value: () => 100 }), /Expected one band of heights in metres, found 3/],
    ['fewer than 2 × 2 cells', tiff(1, 3, { value: () => 100 }), /at least 2 × 2 cells/],
    ['all no-data', tiff(3, 3, { value: () => NODATA, nodata: true }), /has no data/],
    ['projected CRS', tiff(3, 3, { value: () => 100, keys: { GeographicTypeGeoKey: undefined, ProjectedCSTypeGeoKey: 32636, GTModelTypeGeoKey: 1 } }), /Wrong CRS: .*projected \(EPSG:32636\)/],
    ['another geographic CRS', tiff(3, 3, { value: () => 100, keys: { GeographicTypeGeoKey: 4269 } }), /Wrong CRS: expected EPSG:4326, found EPSG:4269/],
    ['too many cells', declaredSize(OVER_SIDE, OVER_SIDE), tooManyCells],
  ]
  it.each(cases)('%s: a 400 naming the reason, nothing stored', async (what, file, reason) => {
    const org = await signIn(ORGANISER)
    const before = await count('terrain_models')
    const r = await upload('/api/workspaces/1/terrain', { name: what }, { name: 'bad.tif', data: file }, org)
    expect(r.status).toBe(400)
    expect(r.body.message).toMatch(reason)
    expect(r.body.data.fields.file).toMatch(reason)
    expect(await count('terrain_models')).toBe(before)
  })

  it('a file over the size cap: 413 naming the cap, nothing stored', async () => {
    const org = await signIn(ORGANISER)
    const before = await count('terrain_models')
    const r = await upload('/api/workspaces/1/terrain', { name: 'big' }, { name: 'big.tif', data: new Uint8Array(MAX_UPLOAD_BYTES + 1) }, org)
    expect(r.status).toBe(413)
    expect(r.body.message).toBe('Files are limited to 25 MB')
    expect(await count('terrain_models')).toBe(before)
  })

  it('the same file, made right, is accepted (the cases above fail for their reason only)', async () => {
    const r = await upload('/api/workspaces/1/terrain', { name: 'fine' }, { name: 'fine.tif', data: tiff(3, 3, { value: (row, c) => 100 + row + c }) }, await signIn(ORGANISER))
    expect(r.status).toBe(201)
    expect(r.body).toMatchObject({ cells: 9, minM: 100, maxM: 104 })
  })
})

describe('climatology upload errors', () => {
  const cases: Case[] = [
    ['several bands (neither one nor twelve)', tiff(4, 4, { bands: 3 }), /Expected 1 band \(one month\) or 12 bands \(one per month\), found 3/],
    ['fewer than 2 × 2 cells', tiff(1, 3), /at least 2 × 2 cells/],
    ['all no-data', tiff(3, 3, { value: () => NODATA, nodata: true }), /has no data/],
    ['all no-data in one month of twelve', tiff(3, 3, { bands: 12, nodata: true, value: (_r, _c, b) => (b === 6 ? NODATA : 20) }), /month 7 has no data/],
    ['projected CRS', tiff(3, 3, { keys: { GeographicTypeGeoKey: undefined, ProjectedCSTypeGeoKey: 32636, GTModelTypeGeoKey: 1 } }), /Wrong CRS: .*projected \(EPSG:32636\)/],
    ['another geographic CRS', tiff(3, 3, { keys: { GeographicTypeGeoKey: 4269 } }), /Wrong CRS: expected EPSG:4326, found EPSG:4269/],
    ['too many cells', declaredSize(OVER_SIDE, OVER_SIDE), tooManyCells],
  ]
  it.each(cases)('%s: a 400 naming the reason, nothing stored', async (what, file, reason) => {
    const org = await signIn(ORGANISER)
    const before = [await count('climatology_datasets'), await count('climatology_grids')]
    const r = await upload('/api/climatology', { name: what, source: 'test', month: '8' }, { name: 'bad.tif', data: file }, org)
    expect(r.status).toBe(400)
    expect(r.body.message).toMatch(reason)
    expect([await count('climatology_datasets'), await count('climatology_grids')]).toEqual(before)
  })

  it('a file over the size cap: 413 naming the cap, nothing stored', async () => {
    const org = await signIn(ORGANISER)
    const before = await count('climatology_datasets')
    const r = await upload('/api/climatology', { name: 'big', source: 'test', month: '8' }, { name: 'big.tif', data: new Uint8Array(MAX_UPLOAD_BYTES + 1) }, org)
    expect(r.status).toBe(413)
    expect(r.body.message).toBe('Files are limited to 25 MB')
    expect(await count('climatology_datasets')).toBe(before)
  })

  it('the same file, made right, is accepted', async () => {
    const r = await upload('/api/climatology', { name: 'fine', source: 'test', month: '8' }, { name: 'fine.tif', data: tiff(3, 3) }, await signIn(ORGANISER))
    expect(r.status).toBe(201)
    expect(r.body.months).toEqual([8])
    // Twelve bands, one month partly without data, is fine too: only an empty month is refused.
    const twelve = await upload('/api/climatology', { name: 'twelve', source: 'test' }, { name: 'twelve.tif', data: tiff(3, 3, { bands: 12, nodata: true, value: (r0, c, b) => (b === 6 && r0 === 0 && c === 0 ? NODATA : 20) }) }, await signIn(ORGANISER))
    expect(twelve.status).toBe(201)
    expect(twelve.body.months).toHaveLength(12)
  })
})
