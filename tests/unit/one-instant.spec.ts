import { describe, expect, it } from 'vitest'
import { computedElementsFor } from '../../server/eclipse/catalogue'
import { localReport } from '../../server/eclipse/report'
import { localAndUtcLine, shownInstant, utcClock } from '../../shared/time/local'

// One instant, one rounding: whatever a page, PDF, e-mail, calendar or countdown prints as local
// time and as UTC must name the same second. The expected second is worked out here on its own:
// the local string read back with its offset, and Intl's own rendering of that second in the zone.
const ZONES = ['Africa/Cairo', 'Europe/Madrid', 'America/Montevideo', 'Asia/Kolkata', 'Australia/Adelaide', 'Pacific/Chatham', 'Etc/GMT+2', 'UTC']

function intlLocal(ms: number, zone: string): string {
  const f = new Intl.DateTimeFormat('en-GB', { timeZone: zone, hour: '2-digit', minute: '2-digit', second: '2-digit', hourCycle: 'h23' })
  return f.format(new Date(ms))
}

function check(utc: string | number, zone: string) {
  const ms = typeof utc === 'number' ? utc : Date.parse(utc)
  const s = shownInstant(utc, zone)
  // The local form, read back with the offset it states, is the very second the UTC form names.
  const fromLocal = Date.parse(`${s.local.replace(' ', 'T')}${s.utcOffset === '+00:00' || s.utcOffset === '' ? 'Z' : s.utcOffset}`)
  const fromUtc = Date.parse(`${s.utcIso.slice(0, 11)}${s.utc}Z`)
  expect(fromLocal).toBe(fromUtc)
  // That second is the instant rounded to the nearest second (half up), no more than 0.5 s away.
  expect(fromUtc % 1000).toBe(0)
  expect(ms - fromUtc).toBeLessThan(500 + 1e-9)
  expect(fromUtc - ms).toBeLessThanOrEqual(500)
  // Intl, asked about that second directly, prints the same local clock; utcClock agrees too.
  expect(s.localClock).toBe(intlLocal(fromUtc, zone))
  expect(utcClock(utc)).toBe(s.utc)
}

describe('local and UTC name the same second', () => {
  it('for many instants, fractions of a second included, in zones with odd offsets', () => {
    let n = 0
    let halves = 0
    let seed = 7
    const rand = () => { seed = (seed * 1103515245 + 12345) % 2147483648; return seed / 2147483648 }
    for (let i = 0; i < 4000; i++) {
      const whole = Date.UTC(2024 + Math.floor(rand() * 10), Math.floor(rand() * 12), 1 + Math.floor(rand() * 28), Math.floor(rand() * 24), Math.floor(rand() * 60), Math.floor(rand() * 60))
      // Tenths as the engine gives them (".5" is the case the old cut-off got wrong), and odd milliseconds.
      const frac = i % 4 === 0 ? 500 : i % 4 === 1 ? Math.floor(rand() * 10) * 100 : Math.floor(rand() * 1000)
      if (frac === 500) halves++
      const iso = new Date(whole + frac).toISOString()
      check(i % 2 ? iso : whole + frac, ZONES[i % ZONES.length]!)
      n++
    }
    expect(n).toBe(4000)
    expect(halves).toBeGreaterThanOrEqual(1000)
  })

  it('for the contacts of real sites along the 2027-08-02 path (the briefing, itinerary and PDF rows)', () => {
    const el = computedElementsFor('2027-08-02')!
    let contacts = 0
    for (let k = 0; k < 60; k++) {
      const site = { latDeg: 20 + k * 0.25, lonDeg: -5 + k * 0.7, elevationM: 100 }
      const r = localReport('2027-08-02', el, site)
      for (const c of [r.c1, r.c2, r.max, r.c3, r.c4]) {
        if (!c) continue
        check(c.utc, 'Africa/Cairo')
        contacts++
      }
    }
    expect(contacts).toBeGreaterThanOrEqual(150)
  })

  it('the basis line under a local-and-UTC table says which column is which', () => {
    const line = localAndUtcLine('Times are UTC. TT − UTC = 69.184 s (x); UT1 − UTC = +0.10 ± 0.2 s, i.e. ΔT = 69.08 s (y).', { zone: 'Africa/Cairo', utcOffset: '+03:00' })
    expect(line).not.toMatch(/^Times are UTC/)
    expect(line).toMatch(/^Local times are the site's clock, Africa\/Cairo \(UTC\+03:00\); the UTC column is UTC/)
    expect(line).toContain('TT − UTC = 69.184 s')
  })
})
