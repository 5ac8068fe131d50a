import { describe, expect, it } from 'vitest'
import { deltaTAt, LAST_OBSERVED, LEAP_SECONDS, taiMinusUtcAt, timeBasisAt, timeBasisLine } from '../../shared/eclipse'

const at = (iso: string) => Date.parse(iso)

describe('ΔT = TT − UT1', () => {
  // USNO deltat.data, monthly values (1st of the month): 2017-08 68.8373 and 2017-09 68.8477,
  // 2024-04 69.1983 and 2024-05 69.2018, 2025-01 69.1377. Linear interpolation between them.
  it.each([
    ['2017-08-01T00:00:00Z', 68.8373], ['2017-09-01T00:00:00Z', 68.8477], ['2024-04-01T00:00:00Z', 69.1983],
    ['2024-05-01T00:00:00Z', 69.2018], ['2025-01-01T00:00:00Z', 69.1377],
  ])('observed at %s is %f s (USNO)', (iso, v) => {
    const e = deltaTAt(at(iso))
    expect(e.basis).toBe('observed')
    expect(e.deltaTSec).toBeCloseTo(v, 3)
  })

  // The defaults the accuracy issue asks for (its table: ΔT with its one-sigma), at greatest eclipse.
  it.each([
    ['2017-08-21T18:25:30Z', 68.8, 0.2], ['2024-04-08T18:17:20Z', 69.2, 0.2],
    ['2026-08-12T17:46:00Z', 69.1, 0.3], ['2027-08-02T10:06:30Z', 69.2, 1.0],
  ])('default for the eclipse of %s is %f ± %f s', (iso, want, tol) => {
    const e = deltaTAt(at(iso))
    expect(Math.abs(e.deltaTSec - want)).toBeLessThanOrEqual(tol)
    expect(e.sigmaSec).toBeLessThanOrEqual(tol + 1e-9)
  })

  it('predicts beyond the last observation, continuous and with a growing one-sigma', () => {
    const just = deltaTAt(LAST_OBSERVED.utcMs + 1000)
    expect(just.basis).toBe('predicted')
    expect(Math.abs(just.deltaTSec - LAST_OBSERVED.deltaTSec)).toBeLessThan(0.001)
    const oneYear = deltaTAt(LAST_OBSERVED.utcMs + 365.25 * 86_400_000)
    expect(oneYear.sigmaSec).toBeGreaterThan(0.5)
    expect(deltaTAt(at('2100-01-01T00:00:00Z')).sigmaSec).toBeGreaterThan(deltaTAt(at('2050-01-01T00:00:00Z')).sigmaSec)
    // No parabola jump: a year ahead ΔT stays within a second of the last observation.
    expect(Math.abs(oneYear.deltaTSec - LAST_OBSERVED.deltaTSec)).toBeLessThan(1)
  })

  it('is continuous where its sources meet (1973-02, and the historic half-years)', () => {
    for (const iso of ['1973-02-01T00:00:00Z', '1972-07-01T00:00:00Z', '1960-01-01T00:00:00Z']) {
      const t = at(iso)
      expect(Math.abs(deltaTAt(t - 86_400_000).deltaTSec - deltaTAt(t + 86_400_000).deltaTSec)).toBeLessThan(0.1)
    }
  })
})

describe('TT − UTC and UT1 − UTC', () => {
  it('TAI − UTC follows the leap-second table (IERS Bulletin C)', () => {
    expect(taiMinusUtcAt(at('1971-12-31T23:59:59Z'))).toBeNull()
    expect(taiMinusUtcAt(at('1972-01-01T00:00:00Z'))).toBe(10)
    expect(taiMinusUtcAt(at('2016-12-31T23:59:59Z'))).toBe(36)
    expect(taiMinusUtcAt(at('2017-01-01T00:00:00Z'))).toBe(37)
    expect(taiMinusUtcAt(at('2027-08-02T10:00:00Z'))).toBe(37)
    expect(LEAP_SECONDS).toHaveLength(28)
  })

  // Two independent series must agree: UTC is steered by leap seconds so that |UT1 − UTC| < 0.9 s.
  // A leap second on the wrong date, or a ΔT value off by a second, breaks this somewhere.
  it('keeps |UT1 − UTC| under 0.9 s every fifth day from 1972 to the last observation', () => {
    let worst = 0
    for (let t = at('1972-01-01T00:00:00Z'); t <= LAST_OBSERVED.utcMs; t += 5 * 86_400_000) {
      worst = Math.max(worst, Math.abs(timeBasisAt(t).ut1MinusUtcSec))
    }
    expect(worst).toBeLessThan(0.9)
  })

  it('states the basis: UTC with TT − UTC 69.184 s in 2027, UT before 1972', () => {
    const b = timeBasisAt(at('2027-08-02T10:07:00Z'))
    expect(b.clock).toBe('UTC')
    expect(b.ttMinusClockSec).toBeCloseTo(69.184, 6)
    expect(b.ut1MinusUtcSec).toBeCloseTo(69.184 - b.deltaTSec, 3)
    expect(timeBasisLine(b)).toMatch(/TT − UTC = 69\.184 s.*UT1 − UTC = [+−]0\.\d\d ± /)
    const old = timeBasisAt(at('1970-03-07T18:00:00Z'))
    expect(old.clock).toBe('UT')
    expect(old.ttMinusClockSec).toBe(old.deltaTSec)
    expect(timeBasisLine(old)).toContain('no UTC')
  })

  it('an override moves UT1 − UTC but not TT − UTC', () => {
    const b = timeBasisAt(at('2027-08-02T10:07:00Z'), { deltaTSec: 70, basis: 'override', source: 'test' })
    expect(b.ttMinusClockSec).toBeCloseTo(69.184, 6)
    expect(b.ut1MinusUtcSec).toBeCloseTo(-0.816, 3)
    expect(b.deltaTBasis).toBe('override')
  })
})
