import { describe, expect, it } from 'vitest'
import { catalogue } from '../../server/eclipse/catalogue'
import { demoScenarioFor, demoSitePlan } from '../../server/database/seed/demoScenario'

// Which eclipses the demo shows on a business date. Expected eclipse dates are trade facts (from
// memory): the next total and annular eclipses after each date, for a demo trip starting three days before.
describe('demo scenario by business date', () => {
  it.each([
    // date, total shown, annular shown ('classic' = the hand-made 2027 scenario)
    ['2026-12-03', 'classic 2027-08-02', 'classic 2027-02-06'],
    ['2027-02-03', 'classic 2027-08-02', 'classic 2027-02-06'], // the day before the annular trip starts
    ['2027-02-04', 'classic 2027-08-02', 'generated 2028-01-26'], // the annular trip has begun
    ['2027-07-29', 'classic 2027-08-02', 'generated 2028-01-26'],
    ['2027-07-30', 'generated 2028-07-22', 'generated 2028-01-26'], // the Luxor trip has begun
    ['2030-01-01', 'generated 2030-11-25', 'generated 2030-06-01'],
    ['2030-05-29', 'generated 2030-11-25', 'generated 2031-05-21'], // trip start = eclipse − 3 days is not ahead
    ['2034-01-01', 'generated 2034-03-20', 'generated 2034-09-12'],
    ['2100-06-01', 'generated 2100-09-04', 'none'], // the catalogue ends in 2100
  ])('on %s: total %s, annular %s', (date, total, annular) => {
    const s = demoScenarioFor(date)
    const show = (p: typeof s.total) => (p ? `${p.source} ${p.eclipseId}` : 'none')
    expect(show(s.total)).toBe(total)
    expect(show(s.annular)).toBe(annular)
  })

  it('skips an eclipse that offers no demo site and takes the next of its kind', () => {
    const s = demoScenarioFor('2030-01-01', (row) => row.id !== '2030-11-25')
    expect(s.total).toEqual({ source: 'generated', eclipseId: '2033-03-30' }) // 2031-11-14 is hybrid
  })

  it('never picks a partial or hybrid eclipse, and every pick has a primary site and a fallback', () => {
    const types = new Map(catalogue().rows.map((r) => [r.id, r.type]))
    for (const date of ['2031-01-01', '2045-06-15', '2061-01-01', '2080-12-31']) {
      const s = demoScenarioFor(date)
      for (const kind of ['total', 'annular'] as const) {
        const p = s[kind]!
        expect(types.get(p.eclipseId)).toBe(kind)
        expect(p.eclipseId > date).toBe(true)
        expect(demoSitePlan(p.eclipseId)!.length).toBeGreaterThanOrEqual(2)
      }
    }
  })
})
