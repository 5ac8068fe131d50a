import { fc } from '@fast-check/vitest'
import { describe, expect, it } from 'vitest'
import { computedElementsFor } from '../../server/eclipse/catalogue'
import { resolveTimeBasis } from '../../server/eclipse/report'
import { demoCloudCsv } from '../../server/database/seed/demoCloud'
import { expectedSeenGrid, surfaceBands, wrapLon, type SurfaceGrid } from '../../server/eclipse/surface'
import { parseCsvGrid, pClearSampler } from '../../server/services/climatology'
import { isLand } from '../../server/services/land'
import { terrainWarnings } from '../../server/services/terrain'
import { centralDurationEvaluator } from '../../shared/eclipse/centralDuration'
import { deltaTHourAngleRad, greatestT, localCircumstances, offsetPoint } from '../../shared/eclipse'
import { centralPathRing } from '../../shared/eclipse/pathBand'
import { haversineKm } from '../../shared/geo/distance'
import { EARTH_MEAN_RADIUS_M, horizonAlong, SUN_SEMIDIAMETER_DEG, TERRESTRIAL_REFRACTION_K, type HeightModel } from '../../shared/geo/horizon'
import { chaseOrder } from '../../shared/planning/chase'
import { canonGreatest, canonSet } from './reference'
import { alongArb } from './sampling'

describe('duration-only evaluation', () => {
  // Total, annular and hybrid eclipses; the full local-circumstance solution is the reference.
  describe.each(['2027-08-02', '2024-04-08', '2023-10-14', '2023-04-20'])('%s', (id) => {
    const el = computedElementsFor(id)!
    const evaluate = centralDurationEvaluator(el, el.deltaTSec)
    const tg = greatestT(el)
    it('matches the full local circumstances to 0.01 s and 0.001°', () => {
      const RUNS = 150
      const seen = { runs: 0, sites: 0, central: 0, annular: 0 }
      fc.assert(fc.property(alongArb(id, 1.3), fc.double({ min: -1.5, max: 1.5, noNaN: true }), fc.integer({ min: 0, max: 3000 }), (along, fraction, elevationM) => {
        seen.runs++
        const p = offsetPoint(el, tg + along, fraction, 'umbra', deltaTHourAngleRad(el.deltaTSec))
        if (!p) return
        seen.sites++
        const full = localCircumstances(el, { latDeg: p.latDeg, lonDeg: p.lonDeg, elevationM }, el.deltaTSec)
        const fast = evaluate(p.latDeg, p.lonDeg, elevationM)
        const central = full.type === 'total' || full.type === 'annular'
        if (central) seen.central++
        if (full.type === 'annular') seen.annular++
        expect(Math.abs(fast.durationSec - (central ? full.durationSec : 0))).toBeLessThan(0.01)
        if (full.max) expect(Math.abs(fast.sunAltitudeDeg - full.max.apparentAltitudeDeg)).toBeLessThan(0.001)
      }), { numRuns: RUNS })
      expect(seen.runs).toBe(RUNS)
      // Reached what it claims: a site in at least 80% of runs, a central phase in at least 40% (the fraction
      // spans ±1.5 half-widths), and for the annular and hybrid eclipses an annular site in at least 10%
      // (the hybrid's annular ends are sampled on purpose: see alongArb).
      expect(seen.sites).toBeGreaterThanOrEqual(0.8 * RUNS)
      expect(seen.central).toBeGreaterThanOrEqual(0.4 * RUNS)
      if (id === '2023-10-14' || id === '2023-04-20') expect(seen.annular).toBeGreaterThanOrEqual(0.1 * RUNS)
    })
  })
})

describe('expected-seen surface of 2027-08-02', () => {
  // From the Five Millennium Canon's own elements and ΔT (tests/fixtures/reference).
  const el = canonSet('2027-08-02')
  const canon = canonGreatest().find((r) => r.date === '2027-08-02')!
  const grid = expectedSeenGrid(el, el.deltaTSec, el.deltaTSec, null) as SurfaceGrid

  it('covers the whole central path on a grid finer than 5 km', () => {
    expect(grid.stepDeg * 111.32).toBeLessThan(5)
    const ring = centralPathRing(el, el.deltaTSec, el.deltaTSec)!
    const covered = new Set<string>()
    for (const row of grid.rows) for (const run of row.runs) for (let k = 0; k < run.durationSec.length; k++) covered.add(`${Math.round(row.latDeg / grid.stepDeg)}:${run.j0 + k}`)
    // Every limit point, and 300 random points across the path, fall in an evaluated cell.
    const tg = greatestT(el)
    const dH = deltaTHourAngleRad(el.deltaTSec)
    let checked = 0
    for (let i = 0; i < 300; i++) {
      const p = offsetPoint(el, tg + (i / 150 - 1) * 1.4, ((i * 7919) % 200) / 100 - 1, 'umbra', dH)
      if (!p || localCircumstances(el, { latDeg: p.latDeg, lonDeg: p.lonDeg }, el.deltaTSec).durationSec === 0) continue
      const key = `${Math.round(p.latDeg / grid.stepDeg)}:${Math.round(p.lonDeg / grid.stepDeg)}`
      expect(covered.has(key), `${p.latDeg}, ${p.lonDeg}`).toBe(true)
      checked++
    }
    expect(checked).toBeGreaterThan(200)
    expect(ring.length).toBeGreaterThan(100)
  })

  it('finds the longest duration where the Canon puts it: 6 min 23 s near greatest eclipse', () => {
    const b = surfaceBands(grid, 'duration')
    // Canon: central duration 6m23s at greatest eclipse, 25.5° N 33.2° E. The longest anywhere is at least that, within the grid's spacing.
    expect(b.best!.durationSec).toBeGreaterThan(canon.centralDurationSec - 1)
    expect(b.best!.durationSec).toBeLessThan(canon.centralDurationSec + 2)
    // The duration hardly changes for hundreds of kilometres along the centreline near its peak, so the longest cell may lie a few hundred km from greatest eclipse.
    expect(haversineKm(b.best!.lat, b.best!.lon, canon.latDeg, canon.lonDeg)).toBeLessThan(400)
  })

  it('puts every cell in the band of its own value, and the best in the top band', () => {
    const pClear = (lat: number, lon: number) => 0.5 + 0.4 * Math.sin(lat / 3) * Math.cos(lon / 5)
    const g = expectedSeenGrid(el, el.deltaTSec, el.deltaTSec, pClear)!
    const b = surfaceBands(g, 'expected')
    const inRect = (lon: number, lat: number, ring: number[][]) => lon >= ring[0]![0]! && lon <= ring[1]![0]! && lat >= ring[0]![1]! && lat <= ring[2]![1]!
    let n = 0
    for (const row of g.rows.filter((_, i) => i % 97 === 0)) for (const run of row.runs) for (let k = 0; k < run.durationSec.length; k += 13) {
      const lon = (run.j0 + k) * g.stepDeg
      const v = run.durationSec[k]! * run.pClear[k]!
      const f = b.features.find((x) => x.geometry.coordinates.some((poly) => inRect(lon, row.latDeg, poly[0]!)))
      if (!(v > 0) || run.sunAltitudeDeg[k]! < 0) { expect(f).toBeUndefined(); continue }
      // The expected value uses the independent pClear function above, not the module's own figures.
      expect(v).toBeCloseTo(run.durationSec[k]! * pClear(row.latDeg, wrapLon(lon)), 4)
      expect(f, `${row.latDeg} ${lon}`).toBeDefined()
      expect(v).toBeGreaterThanOrEqual(f!.properties.fromSec)
      if (f!.properties.band < b.legend.length - 1) expect(v).toBeLessThan(f!.properties.toSec)
      n++
    }
    expect(n).toBeGreaterThan(50)
    expect(b.best!.expectedSec!).toBeGreaterThanOrEqual(b.legend.at(-1)!.fromSec)
    expect(b.legend.length).toBeLessThanOrEqual(8)
  })
})

describe('expected-seen surface against the full solution and the climatology, cell by cell', () => {
  // The app's own inputs for the demo workspace: computed elements, the ΔT and clock basis it resolves, the demo climatology.
  const el = computedElementsFor('2027-08-02')!
  const dt = resolveTimeBasis(el, null)
  const csv = demoCloudCsv()
  const parsed = parseCsvGrid(csv)
  const monthGrid = (v: Float32Array | undefined) => v && { lat0: parsed.lat0, lon0: parsed.lon0, dlat: parsed.dlat, dlon: parsed.dlon, nlat: parsed.nlat, nlon: parsed.nlon, values: v }
  const m = parsed.months.get(8)!
  const grids = { meta: {} as never, cloud: monthGrid(m.cloud)!, clear: monthGrid(m.clear), scattered: monthGrid(m.scattered), broken: monthGrid(m.broken) }
  const grid = expectedSeenGrid(el, dt.deltaTSec, dt.ttMinusClockSec, pClearSampler(grids))!
  const bands = surfaceBands(grid, 'expected')

  /**
   * P(clear) looked up independently of the app's grid code: bilinear between the four surrounding
   * 0.5° rows of the CSV text itself (clamped to the outermost centres, up to half a cell beyond them),
   * weighted clear + 0.72 × scattered + 0.225 × broken (the weighting the climatology page states).
   */
  const rows = new Map<string, number[]>()
  for (const line of csv.trim().split('\n').slice(1)) {
    const [lat, lon, , , clear, scattered, broken] = line.split(',').map(Number)
    rows.set(`${lat!.toFixed(1)},${lon!.toFixed(1)}`, [clear!, scattered!, broken!])
  }
  const lats = [...new Set([...rows.keys()].map((k) => Number(k.split(',')[0])))].sort((a, b) => a - b)
  const lons = [...new Set([...rows.keys()].map((k) => Number(k.split(',')[1])))].sort((a, b) => a - b)
  function pClearIndependent(lat: number, lon: number): number | null {
    const d = 0.5
    if (lat < lats[0]! - d / 2 || lat > lats.at(-1)! + d / 2 || lon < lons[0]! - d / 2 || lon > lons.at(-1)! + d / 2) return null
    const cl = Math.min(Math.max(lat, lats[0]!), lats.at(-1)!), cn = Math.min(Math.max(lon, lons[0]!), lons.at(-1)!)
    const la0 = Math.min(Math.floor(cl / d) * d, lats.at(-1)! - d), lo0 = Math.min(Math.floor(cn / d) * d, lons.at(-1)! - d)
    const ti = (cl - la0) / d, tj = (cn - lo0) / d
    const v = (la: number, lo: number) => { const c = rows.get(`${la.toFixed(1)},${lo.toFixed(1)}`)!; return (c[0]! + 0.72 * c[1]! + 0.225 * c[2]!) / 100 }
    const p = (1 - ti) * (1 - tj) * v(la0, lo0) + (1 - ti) * tj * v(la0, lo0 + d) + ti * (1 - tj) * v(la0 + d, lo0) + ti * tj * v(la0 + d, lo0 + d)
    return Math.min(1, Math.max(0, p))
  }

  interface Cell { lat: number; lon: number; durationSec: number; pClear: number; sunAltitudeDeg: number; why: string }
  const cellAt = (row: SurfaceGrid['rows'][number], run: SurfaceGrid['rows'][number]['runs'][number], k: number, why: string): Cell => ({
    lat: row.latDeg, lon: wrapLon((run.j0 + k) * grid.stepDeg), durationSec: run.durationSec[k]!, pClear: run.pClear[k]!, sunAltitudeDeg: run.sunAltitudeDeg[k]!, why,
  })
  // Cells chosen across the whole path: 25 rows spread from the first to the last (both included), and 25
  // more spread over the rows the demo climatology covers (5–42° N), so that at least 50 cells carry a value;
  // in each the path's two edge cells, the cell midway between them and the margin cell just outside each
  // edge; then the westmost and eastmost cells with a central phase (the sunrise and sunset ends).
  const samples: Cell[] = []
  const inPath: Array<{ cell: Cell; x: number }> = []
  for (const row of grid.rows) for (const run of row.runs) for (let k = 0; k < run.durationSec.length; k++) {
    if (run.durationSec[k]! > 0) inPath.push({ cell: cellAt(row, run, k, 'end'), x: run.j0 + k })
  }
  const spread = <T>(xs: T[], n: number) => Array.from({ length: n }, (_, i) => xs[Math.round((i * (xs.length - 1)) / (n - 1))]!)
  const picks = new Set([...spread(grid.rows, 25), ...spread(grid.rows.filter((r) => r.latDeg > 5.5 && r.latDeg < 41.5), 25)])
  for (const row of picks) {
    for (const run of row.runs) {
      const ks = [...run.durationSec.keys()].filter((k) => run.durationSec[k]! > 0)
      if (!ks.length) continue
      const first = ks[0]!, last = ks.at(-1)!
      samples.push(cellAt(row, run, first, 'edge'), cellAt(row, run, last, 'edge'), cellAt(row, run, Math.round((first + last) / 2), 'middle'))
      if (first > 0) samples.push(cellAt(row, run, first - 1, 'margin'))
      if (last < run.durationSec.length - 1) samples.push(cellAt(row, run, last + 1, 'margin'))
    }
  }
  inPath.sort((a, b) => a.x - b.x)
  const sunrise = inPath.slice(0, 3).map((c) => ({ ...c.cell, why: 'sunrise end' }))
  const sunset = inPath.slice(-3).map((c) => ({ ...c.cell, why: 'sunset end' }))
  samples.push(...sunrise, ...sunset)

  it('samples at least 50 cells, the path edges and both ends among them; the ends are where the Sun is low', () => {
    expect(samples.length).toBeGreaterThanOrEqual(100)
    expect(samples.filter((c) => c.why === 'edge').length).toBeGreaterThanOrEqual(40)
    expect(samples.filter((c) => c.why === 'margin').length).toBeGreaterThanOrEqual(20)
    // Sunrise over the Atlantic, sunset over the Indian Ocean: within a few degrees of the horizon at each end.
    for (const c of [...sunrise, ...sunset]) expect(c.sunAltitudeDeg, `${c.why} ${c.lat} ${c.lon}`).toBeLessThan(5)
    expect(sunrise[0]!.lon).toBeLessThan(-20)
    expect(sunset[0]!.lon).toBeGreaterThan(45)
  })

  it('gives every sampled cell the full local circumstances\' duration at its centre to 1 s, and duration × P(clear) there as its value', () => {
    const inRect = (lon: number, lat: number, ring: number[][]) => lon >= ring[0]![0]! && lon <= ring[1]![0]! && lat >= ring[0]![1]! && lat <= ring[2]![1]!
    const bandOf = (lat: number, lon: number) => bands.features.filter((f) => f.geometry.coordinates.some((poly) => inRect(lon, lat, poly[0]!)))
    const problems: string[] = []
    let valued = 0
    for (const c of samples) {
      const full = localCircumstances(el, { latDeg: c.lat, lonDeg: c.lon, elevationM: 0 }, dt.deltaTSec, dt.ttMinusClockSec)
      const fullSec = full.type === 'total' || full.type === 'annular' ? full.durationSec : 0
      // 1 s: the bound the brief sets for the surface against the full solution (the evaluator's own target is 0.01 s, above).
      if (!(Math.abs(c.durationSec - fullSec) <= 1)) problems.push(`${c.why} ${c.lat},${c.lon}: duration ${c.durationSec} s, full solution ${fullSec} s`)
      const p = pClearIndependent(c.lat, c.lon)
      if (c.durationSec > 0) {
        // The grid keeps P(clear) as 32-bit floats: 2^-24 relative, so 1e-6 absolute is ample.
        if (p === null ? !Number.isNaN(c.pClear) : !(Math.abs(c.pClear - p) <= 1e-6)) problems.push(`${c.why} ${c.lat},${c.lon}: P(clear) ${c.pClear}, climatology ${p}`)
      }
      const f = bandOf(c.lat, c.lon)
      const value = fullSec * (p ?? Number.NaN)
      if (!(value > 0) || full.max === null || c.sunAltitudeDeg < 0) {
        if (f.length) problems.push(`${c.why} ${c.lat},${c.lon}: in band ${f[0]!.properties.band} with no expected value`)
        continue
      }
      if (f.length !== 1) { problems.push(`${c.why} ${c.lat},${c.lon}: in ${f.length} bands, value ${value}`); continue }
      const b = f[0]!.properties
      const top = b.band === bands.legend.length - 1
      // The value may be off by the duration's 1 s × P(clear) ≤ 1 s, so a cell within 1 s of a band's edge may sit on either side.
      if (value < b.fromSec - 1 || (!top && value >= b.toSec + 1)) problems.push(`${c.why} ${c.lat},${c.lon}: value ${value} s in band ${b.fromSec}–${b.toSec} s`)
      valued++
    }
    expect(problems).toEqual([])
    // At least 50 sampled cells carry a value (the rest are margins, Sun-down ends or cells off the climatology grid).
    expect(valued).toBeGreaterThanOrEqual(50)
  })
})

describe('land mask (Natural Earth 1:10m land)', () => {
  it('knows land from sea at places everyone can check', () => {
    // Luxor, Cairo and Jeddah are on land; the middle of the Red Sea and the Mediterranean off Alexandria are not.
    expect(isLand(25.6872, 32.6396)).toBe(true)
    expect(isLand(30.0444, 31.2357)).toBe(true)
    expect(isLand(21.4858, 39.1925 + 0.05)).toBe(true)
    expect(isLand(25.0, 36.0)).toBe(false)
    expect(isLand(32.5, 29.9)).toBe(false)
  })
})

describe('terrain horizon', () => {
  const R = EARTH_MEAN_RADIUS_M
  const k = TERRESTRIAL_REFRACTION_K
  /** A ridge `heightM` high from `fromM` to `toM` east of the origin along the equator; flat 0 m elsewhere. */
  const ridge = (fromM: number, toM: number, heightM: number, cellKm = 0.03): HeightModel => ({
    cellKm,
    heightAt: (lat, lon) => {
      if (Math.abs(lat) > 0.5 || lon < -0.5 || lon > 2) return null
      const dM = (lon * Math.PI / 180) * R
      return dM >= fromM && dM <= toM ? heightM : 0
    },
  })
  // Expected apparent angle: atan((h − h0) / d) − d / (2R), plus terrestrial refraction k·d/(2R), k = 0.13.
  const expected = (h: number, h0: number, d: number) => (Math.atan((h - h0) / d) - d / (2 * R) + k * d / (2 * R)) * 180 / Math.PI

  it.each([
    { fromM: 10_000, h: 500, h0: 0 },
    { fromM: 2_000, h: 900, h0: 120 },
    { fromM: 40_000, h: 2500, h0: 300 },
  ])('a ridge of $h m at $fromM m seen from $h0 m', ({ fromM, h, h0 }) => {
    const got = horizonAlong(ridge(fromM, fromM + 3000, h), 0, 0, h0, 90)!
    // The march samples at most max(15 m, 0.5 % of d) past the ridge's near edge: the angle moves by at most that much.
    const step = Math.max(15, fromM * 0.005)
    const bound = ((h - h0) / fromM ** 2 + 1 / (2 * R)) * step * 180 / Math.PI + 1e-6
    expect(Math.abs(got.altitudeDeg - expected(h, h0, fromM))).toBeLessThanOrEqual(bound)
    expect(got.distanceKm * 1000).toBeGreaterThanOrEqual(fromM)
    expect(got.distanceKm * 1000).toBeLessThanOrEqual(fromM + step + 1)
    expect(got.geometricDeg).toBeCloseTo((Math.atan((h - h0) / (got.distanceKm * 1000)) - got.distanceKm * 1000 / (2 * R)) * 180 / Math.PI, 9)
  })

  it('lets the Earth\'s curvature hide a far ridge: 1000 m at 100 km stands at about 0.18°, not 0.57°', () => {
    const got = horizonAlong(ridge(100_000, 103_000, 1000), 0, 0, 0, 90)!
    expect(got.altitudeDeg).toBeCloseTo(expected(1000, 0, 100_000), 2)
    expect(got.altitudeDeg).toBeLessThan(0.2)
    expect(Math.atan(1000 / 100_000) * 180 / Math.PI).toBeGreaterThan(0.57)
  })

  it('looks only in the direction asked', () => {
    const m = ridge(5_000, 8_000, 800)
    expect(horizonAlong(m, 0, 0, 0, 90)!.altitudeDeg).toBeGreaterThan(8)
    expect(horizonAlong(m, 0, 0, 0, 270)!.altitudeDeg).toBeLessThan(0.01)
  })
})

describe('chase order', () => {
  it('ranks by expected seen seconds in 10 s steps, then by the shorter trip, sites without a central phase last', () => {
    const order = chaseOrder([
      { id: 'far-best', expectedSec: 300, durationSec: 320, distanceKm: 400 },
      { id: 'near-good', expectedSec: 296, durationSec: 330, distanceKm: 40 },
      { id: 'outside', expectedSec: 0, durationSec: 0, distanceKm: 5 },
      { id: 'near-poor', expectedSec: 120, durationSec: 300, distanceKm: 10 },
    ]).map((x) => x.id)
    expect(order).toEqual(['far-best', 'near-good', 'near-poor', 'outside'])
    const tie = chaseOrder([
      { id: 'b', expectedSec: 292, durationSec: 320, distanceKm: 90 },
      { id: 'a', expectedSec: 298, durationSec: 320, distanceKm: 30 },
    ]).map((x) => x.id)
    expect(tie).toEqual(['a', 'b'])
  })
})

describe('terrain warnings for the timetable', () => {
  const contact = (sunAltitudeDeg: number, terrainAltitudeDeg: number) => ({
    sunAltitudeDeg, terrainAltitudeDeg, marginDeg: sunAltitudeDeg - terrainAltitudeDeg, azimuthDeg: 100, distanceKm: 3,
    clear: sunAltitudeDeg - terrainAltitudeDeg > SUN_SEMIDIAMETER_DEG, close: sunAltitudeDeg - terrainAltitudeDeg < 2,
  })
  it('warns at every contact within 2° of the terrain, and says which are behind it', () => {
    const lines = terrainWarnings({
      c1: contact(5, 6), c2: contact(12, 10.5), max: contact(14, 9), c3: contact(16, 15.9), c4: contact(30, 1),
      source: 'test', observerHeightM: 0, heightSource: 'site', groundHeightM: 0, profile: [], sunTrack: [],
    })
    expect(lines).toHaveLength(3)
    expect(lines[0]).toMatch(/^C1: .* behind the terrain/)
    expect(lines[1]).toMatch(/^C2: .* only 1\.5° above the terrain/)
    expect(lines[2]).toMatch(/^C3: .* behind the terrain/) // 0.1° is less than the Sun's semi-diameter
    expect(terrainWarnings(null)).toEqual([])
  })
})
