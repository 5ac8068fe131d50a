import { afterEach, describe, expect, it } from 'vitest'
import { advanceClock, businessDate, nowMs, testClockEnabled } from '../../server/services/clock'

const saved = { ...process.env }
afterEach(() => { process.env = { ...saved } })

describe('the one clock', () => {
  it('cannot be moved unless the test clock is on and the app is local', () => {
    delete process.env.UMBRAFIELD_TEST_CLOCK
    expect(testClockEnabled()).toBe(false)
    expect(() => advanceClock(1000)).toThrow(/test clock is off/)
    process.env.UMBRAFIELD_TEST_CLOCK = '1'
    process.env.NUXT_PUBLIC_APP_URL = 'https://trips.example.com'
    expect(testClockEnabled()).toBe(false)
    expect(() => advanceClock(1000)).toThrow(/test clock is off/)
  })

  it('moves forward only, and "today" follows it', () => {
    process.env.UMBRAFIELD_TEST_CLOCK = '1'
    process.env.NUXT_PUBLIC_APP_URL = 'http://127.0.0.1:3000'
    delete process.env.UMBRAFIELD_FIXED_DATE
    expect(() => advanceClock(-1)).toThrow(/only moves forward/)
    const before = nowMs()
    const today = businessDate()
    advanceClock(3 * 86_400_000)
    expect(nowMs() - before).toBeGreaterThanOrEqual(3 * 86_400_000)
    expect(Date.parse(businessDate()) - Date.parse(today)).toBe(3 * 86_400_000)
  })

  it('a pinned business date holds only on a local app', () => {
    process.env.UMBRAFIELD_FIXED_DATE = '2030-01-01'
    process.env.NUXT_PUBLIC_APP_URL = 'http://localhost:3000'
    expect(businessDate()).toBe('2030-01-01')
    process.env.NUXT_PUBLIC_APP_URL = 'https://trips.example.com'
    expect(businessDate()).not.toBe('2030-01-01')
  })
})
