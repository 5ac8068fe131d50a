import { describe, expect, it } from 'vitest'
import { purgeBefore } from '../../server/services/personalData/purge'

describe('the purge date', () => {
  // A trip whose last day is D keeps its participants' details through D + days: purged are trips
  // that ended before purgeBefore(today, days).
  it.each([
    ['2027-08-05', 90, '2027-05-07'],
    ['2027-03-01', 1, '2027-02-28'],
    ['2028-03-01', 1, '2028-02-29'],
    ['2027-01-10', 30, '2026-12-11'],
    ['2027-01-10', 0, '2027-01-10'],
  ])('on %s with %i days: trips that ended before %s', (today, days, want) => {
    expect(purgeBefore(today, days)).toBe(want)
  })
})
