import { fc, test } from '@fast-check/vitest'
import { describe, expect, it } from 'vitest'
import { computedElementsFor } from '../../server/eclipse/catalogue'
import { localReport } from '../../server/eclipse/report'
import { skyAt } from '../../server/eclipse/sky'
import { cueInputFor } from '../../server/services/timetable'
import { briefingSequence } from '../../shared/briefing/sequence'
import { coronaOn } from '../../shared/briefing/solarCycle'
import { deltaTHourAngleRad, greatestT, offsetPoint } from '../../shared/eclipse'
import { localKindOf } from '../../shared/safety/text'

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

describe.each(ECLIPSES)('briefing sequence at random sites of %s', (id) => {
  test.prop([fc.double({ min: -1, max: 1, noNaN: true }), fc.double({ min: -1.3, max: 1.3, noNaN: true }),
    fc.record({ sigmas: fc.double({ min: 0, max: 5, noNaN: true }), endSec: fc.double({ min: 0, max: 30, noNaN: true }) })], { numRuns: 25 })(
    'no filters-off step outside the cue rule\'s window; no "totality" and no filters-off at annular or partial sites; steps in time order',
    (along, fraction, margins) => {
      const got = siteAt(id, along, fraction)
      if (!got || !got.r.max) return
      const { el, r, p } = got
      const kind = localKindOf(r.type)
      const input = cueInputFor(el, r, { filter_margin_sigmas: margins.sigmas, filter_margin_end_sec: margins.endSec }, {}, [])
      const contacts = Object.fromEntries((['c1', 'c2', 'max', 'c3', 'c4'] as const).filter((k) => r[k]).map((k) => [k, { utc: r[k]!.utc, altitudeDeg: r[k]!.altitudeDeg, azimuthDeg: r[k]!.azimuthDeg, direction: (r[k] as { direction?: string }).direction }]))
      const b = briefingSequence({ kind, zone: 'UTC', durationSec: r.durationSec, contacts, cueInput: input, sky: skyAt(Date.parse(r.max!.utc), p.latDeg, p.lonDeg), coronaShape: 'x' })
      const off = b.steps.filter((s) => s.filters === 'off')
      if (kind !== 'total') {
        expect(off).toEqual([])
        expect(JSON.stringify(b.steps)).not.toMatch(/totality/i)
      }
      // The window recomputed here from the contacts and the least margins (2 σ; 2 σ + 5 s before C3).
      const c2 = input.contacts.c2, c3 = input.contacts.c3
      for (const s of off) {
        expect(c2 && c3).toBeTruthy()
        expect(Date.parse(s.utc)).toBeGreaterThanOrEqual(c2!.utcMs + 2 * c2!.uncertaintySec * 1000)
        expect(Date.parse(s.utc)).toBeLessThanOrEqual(c3!.utcMs - (2 * c3!.uncertaintySec + 5) * 1000)
      }
      for (let i = 1; i < b.steps.length; i++) expect(b.steps[i]!.utc >= b.steps[i - 1]!.utc).toBe(true)
      if (kind === 'total' && !b.plan.window) expect(b.steps.some((s) => s.key === 'too-short')).toBe(true)
    })
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
