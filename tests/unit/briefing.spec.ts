import { fc } from '@fast-check/vitest'
import { describe, expect, it } from 'vitest'
import { computedElementsFor } from '../../server/eclipse/catalogue'
import { localReport } from '../../server/eclipse/report'
import { skyAt } from '../../server/eclipse/sky'
import { cueInputFor } from '../../server/services/timetable'
import { briefingSequence } from '../../shared/briefing/sequence'
import { coronaOn } from '../../shared/briefing/solarCycle'
import { deltaTHourAngleRad, greatestT, offsetPoint } from '../../shared/eclipse'
import { MIN_MARGIN_END_SEC, MIN_MARGIN_SIGMAS } from '../../shared/safety/cues'
import { localKindOf } from '../../shared/safety/text'
import { alongArb, marginsArb } from './sampling'

describe('corona phase against published solar-cycle dates', () => {
  // Sources: the NASA/NOAA Solar Cycle 25 Prediction Panel (September 2020) dated the minimum
  // between cycles 24 and 25 to December 2019; NASA and NOAA announced in October 2024 that the Sun
  // had reached its maximum period. SILSO (Royal Observatory of Belgium) lists the smoothed maximum
  // of cycle 24 in April 2014 (from memory).
  it('2019-07-02 (seven months before the December 2019 minimum) is near minimum', () => {
    expect(coronaOn('2019-07-02')!.phase).toBe('near-minimum')
  })
  it('2020-12-14 (a year after the December 2019 minimum) is near minimum', () => {
    expect(coronaOn('2020-12-14')!.phase).toBe('near-minimum')
  })
  it('2024-04-08 (six months before the October 2024 maximum) is near maximum', () => {
    expect(coronaOn('2024-04-08')!.phase).toBe('near-maximum')
  })
  it('2017-08-21 (between the April 2014 maximum and the December 2019 minimum, over two years from each) is declining', () => {
    expect(coronaOn('2017-08-21')!.phase).toBe('declining')
  })
  it('2027-08-02 (almost three years after the October 2024 maximum) is declining, and says it is a briefing, not a prediction', () => {
    const c = coronaOn('2027-08-02')!
    expect(c.phase).toBe('declining')
    expect(c.caveat).toMatch(/not a prediction/)
    expect(c.nearest.source).toMatch(/NASA|NOAA/)
  })
  it('dates beyond the table say nothing rather than guess', () => {
    expect(coronaOn('1990-01-01')).toBeNull()
    expect(coronaOn('2035-01-01')).toBeNull()
  })
})

const ECLIPSES = ['2027-08-02', '2027-02-06', '2023-04-20', '2026-08-12'] as const

function siteAt(id: string, along: number, fraction: number) {
  const el = computedElementsFor(id)!
  const p = offsetPoint(el, greatestT(el) + along, fraction, 'umbra', deltaTHourAngleRad(el.deltaTSec))
  if (!p) return null
  const r = localReport(id, el, { latDeg: p.latDeg, lonDeg: p.lonDeg }, null)
  return { el, r, p }
}

const RUNS = 40
const KIND: Record<(typeof ECLIPSES)[number], 'total' | 'annular' | 'hybrid'> = {
  '2027-08-02': 'total', '2027-02-06': 'annular', '2023-04-20': 'hybrid', '2026-08-12': 'total',
}

describe.each(ECLIPSES)('briefing sequence at random sites of %s', (id) => {
  it('no filters-off step outside the window the margins in force give; no "totality" and no filters-off at annular or partial sites; steps in time order', () => {
    const seen = { runs: 0, sites: 0, annular: 0, offSteps: 0, widerWithOffSteps: 0 }
    fc.assert(fc.property(alongArb(id, 1), fc.double({ min: -1.3, max: 1.3, noNaN: true }), marginsArb(MIN_MARGIN_SIGMAS, MIN_MARGIN_END_SEC), (along, fraction, margins) => {
      seen.runs++
      const got = siteAt(id, along, fraction)
      if (!got || !got.r.max) return
      seen.sites++
      const { el, r, p } = got
      const kind = localKindOf(r.type)
      if (kind === 'annular') seen.annular++
      const input = cueInputFor(el, r, { filter_margin_sigmas: margins.sigmas, filter_margin_end_sec: margins.endSec }, {}, [])
      const contacts = Object.fromEntries((['c1', 'c2', 'max', 'c3', 'c4'] as const).filter((k) => r[k]).map((k) => [k, { utc: r[k]!.utc, altitudeDeg: r[k]!.altitudeDeg, azimuthDeg: r[k]!.azimuthDeg, direction: (r[k] as { direction?: string }).direction }]))
      const b = briefingSequence({ kind, zone: 'UTC', durationSec: r.durationSec, contacts, cueInput: input, sky: skyAt(Date.parse(r.max!.utc), p.latDeg, p.lonDeg), coronaShape: 'x' })
      const off = b.steps.filter((s) => s.filters === 'off')
      if (kind !== 'total') {
        expect(off).toEqual([])
        expect(JSON.stringify(b.steps)).not.toMatch(/totality/i)
      }
      // The window recomputed here from the contacts and the margins in force: what the organiser stored,
      // never below the least margins (2 σ; 2 σ + 5 s before C3). Step times are shown to the second.
      const sigmas = Math.max(MIN_MARGIN_SIGMAS, margins.sigmas), endSec = Math.max(MIN_MARGIN_END_SEC, margins.endSec)
      const c2 = input.contacts.c2, c3 = input.contacts.c3
      for (const s of off) {
        expect(c2 && c3).toBeTruthy()
        expect(Date.parse(s.utc)).toBeGreaterThanOrEqual(c2!.utcMs + sigmas * c2!.uncertaintySec * 1000)
        expect(Date.parse(s.utc)).toBeLessThanOrEqual(c3!.utcMs - (sigmas * c3!.uncertaintySec + endSec) * 1000)
      }
      if (off.length) {
        seen.offSteps++
        if (sigmas > MIN_MARGIN_SIGMAS || endSec > MIN_MARGIN_END_SEC) seen.widerWithOffSteps++
      }
      for (let i = 1; i < b.steps.length; i++) expect(b.steps[i]!.utc >= b.steps[i - 1]!.utc).toBe(true)
      if (kind === 'total' && !b.plan.window) expect(b.steps.some((s) => s.key === 'too-short')).toBe(true)
    }), { numRuns: RUNS })
    console.log(`[briefing ${id}] ${JSON.stringify(seen)}`)
    expect(seen.runs).toBe(RUNS)
    // Reached what it claims (minimums far below the rates these arbitraries give): a site in at least 80% of
    // runs; where the eclipse has totality, filters-off steps checked in at least 5% of runs and at least 3 of
    // them under margins wider than the least; annular sites (the annular eclipse, the hybrid's ends) in 10%.
    expect(seen.sites).toBeGreaterThanOrEqual(0.8 * RUNS)
    if (KIND[id] !== 'annular') {
      expect(seen.offSteps).toBeGreaterThanOrEqual(0.05 * RUNS)
      expect(seen.widerWithOffSteps).toBeGreaterThanOrEqual(3)
    }
    if (KIND[id] !== 'total') expect(seen.annular).toBeGreaterThanOrEqual(0.1 * RUNS)
  }, 60_000)
})

describe('the annular sequence', () => {
  it('Punta del Este, 2027-02-06: ring, maximum, ring breaks, all with filters on, never "totality"', () => {
    const el = computedElementsFor('2027-02-06')!
    const r = localReport('2027-02-06', el, { latDeg: -34.96, lonDeg: -54.95 }, null)
    expect(r.type).toBe('annular')
    const input = cueInputFor(el, r, { filter_margin_sigmas: 2, filter_margin_end_sec: 5 }, {}, [])
    const contacts = Object.fromEntries((['c1', 'c2', 'max', 'c3', 'c4'] as const).map((k) => [k, { utc: r[k]!.utc, altitudeDeg: r[k]!.altitudeDeg, azimuthDeg: r[k]!.azimuthDeg }]))
    const b = briefingSequence({ kind: 'annular', zone: 'America/Montevideo', durationSec: r.durationSec, contacts, cueInput: input, sky: [] })
    expect(b.steps.map((s) => s.key)).toEqual(['partial-begins', 'light', 'annularity', 'maximum', 'annularity-ends', 'partial-ends'])
    expect(b.steps.every((s) => s.filters === 'on')).toBe(true)
    expect(JSON.stringify(b)).not.toMatch(/totality/i)
    // Local time in Uruguay (UTC−3 all year).
    expect(b.steps[0]!.utcOffset).toBe('-03:00')
  })
})
