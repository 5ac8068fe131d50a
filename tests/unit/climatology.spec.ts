import { writeArrayBuffer } from 'geotiff'
import { describe, expect, it } from 'vitest'
import { pClearOf, sampleGrid, type Grid } from '../../shared/climate/grid'
import { ClimatologyError, cloudAt, parseCsvGrid, parseGeoTiff } from '../../server/services/climatology'

// A 3 × 3 grid of cell centres at lat 10, 11, 12 and lon 20, 21, 22 (rows from the south):
//   lat 12:  30  40  50
//   lat 11:  20  NaN 40
//   lat 10:  10  20  30
const g: Grid = { lat0: 10, lon0: 20, dlat: 1, dlon: 1, nlat: 3, nlon: 3, values: [10, 20, 30, 20, Number.NaN, 40, 30, 40, 50] }

describe('bilinear interpolation, worked by hand', () => {
  it('at (10.25, 20.5): between 10, 20 (south row) and 20, NaN (north row)', () => {
    // Weights: (0.75·0.5) 10 + (0.75·0.5) 20 + (0.25·0.5) 20 + (0.25·0.5) NaN → the NaN is dropped and the rest re-weighted:
    // (3.75 + 7.5 + 2.5) / (0.375 + 0.375 + 0.125) = 13.75 / 0.875 = 15.714…
    const s = sampleGrid(g, 10.25, 20.5)
    expect(s.method).toBe('bilinear over valid neighbours')
    expect(s.value).toBeCloseTo(13.75 / 0.875, 6)
  })
  it('at (11.5, 21.5), in the upper-right square whose south-west corner is no-data', () => {
    // Square lat 11–12, lon 21–22: 40 (11,22), NaN (11,21), 40 (12,21), 50 (12,22), each weight 0.25; NaN dropped:
    // (10 + 10 + 12.5) / 0.75 = 43.333…
    const s = sampleGrid(g, 11.5, 21.5)
    expect(s.value).toBeCloseTo(32.5 / 0.75, 6)
  })
  it('at (10.5, 20.25) inside the lower-left square with the NaN corner weighted 0.125', () => {
    // (0.5·0.75)·10 + (0.5·0.25)·20 + (0.5·0.75)·20 + (0.5·0.25)·NaN → (3.75 + 2.5 + 7.5)/(0.875) = 15.714…
    expect(sampleGrid(g, 10.5, 20.25).value).toBeCloseTo(13.75 / 0.875, 6)
  })
  it('plain bilinear where all four corners are valid', () => {
    const full: Grid = { ...g, values: [10, 20, 30, 20, 30, 40, 30, 40, 50] }
    // Square lat 10–11, lon 21–22: 20, 30, 30, 40 each 0.25 → 30; at (10.2, 21.7): 0.8·(0.3·20 + 0.7·30) + 0.2·(0.3·30 + 0.7·40) = 0.8·27 + 0.2·37 = 29
    expect(sampleGrid(full, 10.5, 21.5)).toEqual({ value: 30, method: 'bilinear' })
    expect(sampleGrid(full, 10.2, 21.7).value).toBeCloseTo(29, 6)
  })
  it('on a no-data centre uses the surrounding valid cells, and says when the site is outside', () => {
    // Exactly on the no-data centre (11, 21): its four nearest valid cells 20, 20, 40, 40 are equally near → 30.
    expect(sampleGrid(g, 11, 21)).toEqual({ value: 30, method: 'nearest valid cell' })
    const holes: Grid = { ...g, values: [Number.NaN, Number.NaN, 30, Number.NaN, Number.NaN, 40, 30, 40, 50] }
    expect(sampleGrid(holes, 10.2, 20.2)).toEqual({ value: 30, method: 'nearest valid cell' })
    expect(sampleGrid(g, 9, 20).method).toBe('outside grid')
    expect(sampleGrid(g, 11, 23).method).toBe('outside grid')
  })
})

describe('P(clear)', () => {
  // NASA eclipse bulletin weighting: % clear + 0.72 × % scattered + 0.225 × % broken.
  it('uses cloud categories when given: 50 clear, 20 scattered, 20 broken → 0.689', () => {
    expect(pClearOf(40, { clear: 50, scattered: 20, broken: 20 }).pClear).toBeCloseTo(0.5 + 0.144 + 0.045, 6)
  })
  it('falls back to 1 − mean cloud fraction, labelled as the simpler estimate', () => {
    const p = pClearOf(35)
    expect(p.pClear).toBeCloseTo(0.65, 6)
    expect(p.method).toMatch(/simpler estimate/)
  })
})

describe('GeoTIFF import', () => {
  function tiff(values: number[], width: number, height: number, extra: Record<string, unknown> = {}) {
    return Buffer.from(writeArrayBuffer(new Float32Array(values), {
      width, height, GeographicTypeGeoKey: 4326, GTModelTypeGeoKey: 2, GTRasterTypeGeoKey: 1,
      ModelPixelScale: [1, 1, 0], ModelTiepoint: [0, 0, 0, 20, 13, 0], ...extra,
    }) as ArrayBuffer)
  }
  it('reads a generated single-band fraction grid back and interpolates it', async () => {
    // North-up 3 × 3 cells from 13° N, 20° E; centres at lat 12.5, 11.5, 10.5 and lon 20.5, 21.5, 22.5.
    const buf = tiff([0.3, 0.4, 0.5, 0.2, 0.3, 0.4, 0.1, 0.2, 0.3], 3, 3)
    const grid = await parseGeoTiff(buf, 8)
    expect(grid).toMatchObject({ lat0: 10.5, lon0: 20.5, dlat: 1, dlon: 1, nlat: 3, nlon: 3 })
    const m = grid.months.get(8)!
    expect(Array.from(m.cloud).map((v) => Math.round(v * 1000) / 1000)).toEqual([10, 20, 30, 20, 30, 40, 30, 40, 50])
    const s = sampleGrid({ ...grid, values: m.cloud }, 11, 21)
    expect(s.value).toBeCloseTo(20, 4) // centre of the square of 10, 20, 20, 30 percent: their mean
  })
  it('rejects a projected CRS, out-of-range values and a missing month', async () => {
    await expect(parseGeoTiff(tiff([10, 20, 30, 40], 2, 2, { GeographicTypeGeoKey: undefined, ProjectedCSTypeGeoKey: 3857, GTModelTypeGeoKey: 1 }), 8)).rejects.toThrow(/Wrong CRS/)
    await expect(parseGeoTiff(tiff([10, 20, 130, 40], 2, 2), 8)).rejects.toThrow(/out of range/)
    await expect(parseGeoTiff(tiff([10, 20, 30, 40], 2, 2))).rejects.toThrow(/Choose the month/)
    await expect(parseGeoTiff(Buffer.from('not a tiff'), 8)).rejects.toThrow(ClimatologyError)
  })
})

describe('CSV grid import', () => {
  const header = 'lat,lon,month,cloud_pct,clear_pct,scattered_pct,broken_pct\n'
  it('reads a regular grid with categories; P(clear) uses the sky-category weighting', () => {
    const csv = header + ['10,20,8,40,50,20,20', '10,21,8,40,50,20,20', '11,20,8,40,50,20,20', '11,21,8,40,50,20,20'].join('\n')
    const grid = parseCsvGrid(csv)
    const m = grid.months.get(8)!
    const at = cloudAt({ meta: { name: 'T', demo: 0 } as never, cloud: { ...grid, values: m.cloud }, clear: { ...grid, values: m.clear! }, scattered: { ...grid, values: m.scattered! }, broken: { ...grid, values: m.broken! } }, 10.5, 20.5)
    expect(at.cloudPct).toBe(40)
    expect(at.pClear).toBeCloseTo(0.689, 3)
    expect(at.pClearMethod).toMatch(/sky-category weighting/)
  })
  it.each([
    ['a ragged grid', header.split(',').slice(0, 4).join(',') + '\n10,20,8,40\n10,21,8,40\n11,20,8,40\n', /missing 1 of 4 cells/],
    ['irregular spacing', 'lat,lon,month,cloud_pct\n10,20,8,1\n10,21,8,1\n10,23,8,1\n11,20,8,1\n11,21,8,1\n11,23,8,1\n', /not regular/],
    ['a bad month', 'lat,lon,month,cloud_pct\n10,20,13,1\n', /month must be a whole number 1–12/],
    ['an out-of-range value', 'lat,lon,month,cloud_pct\n10,20,8,101\n', /cloud_pct out of range/],
    ['a missing column', 'lat,lon,cloud_pct\n10,20,5\n', /Missing column "month"/],
  ])('rejects %s', (_what, csv, msg) => {
    expect(() => parseCsvGrid(csv)).toThrow(msg)
  })
})

describe('grid size caps', () => {
  it('a "diagonal" CSV (distinct latitudes and longitudes on every row) is refused before any grid is allocated', async () => {
    const { parseCsvGrid } = await import('../../server/services/climatology')
    const rows = Array.from({ length: 2000 }, (_, i) => `${(-60 + i * 0.05).toFixed(2)},${(-100 + i * 0.1).toFixed(1)},8,50`)
    const csv = `lat,lon,month,cloud_pct\n${rows.join('\n')}\n`
    const before = process.memoryUsage().arrayBuffers
    expect(() => parseCsvGrid(csv)).toThrow(/Ragged grid: 2000 latitudes × 2000 longitudes × 1 month\(s\) need 4000000 rows, the file has 2000/)
    // Nothing like the 4 million cells (16 MB a layer) was allocated on the way.
    expect(process.memoryUsage().arrayBuffers - before).toBeLessThan(8 * 1024 * 1024)
  })
})
