import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { describe, expect, it } from 'vitest'
import { fromStoredSet, type StoredSet } from '../../server/eclipse/catalogue'
import { isLand } from '../../server/services/land'
import { greatestEclipse } from '../../shared/eclipse/greatest'
import { pathOffset } from '../../shared/eclipse/local'
import type { BesselianElements } from '../../shared/eclipse/types'
import { api, GUIDE, signIn, TEST_DB, TRAVELLER2, useApp } from './app'

// The demo never goes stale: with the business date pinned past the hand-made 2027 scenario, the
// seed invents a published total-eclipse trip and an annular one for later eclipses. Checked
// against the stored element sets read straight from the catalogue file (not through the seed).
const sets = (JSON.parse(readFileSync(resolve(__dirname, '../../server/eclipse/data/catalogue.json'), 'utf8')) as { sets: StoredSet[] }).sets
const byId = new Map<string, { el: BesselianElements; type: string; greatestUtc: string }>()
for (const s of sets) {
  const el = fromStoredSet(s)
  const g = greatestEclipse(el)
  byId.set(g.utc.slice(0, 10), { el, type: g.type, greatestUtc: g.utc })
}
// The Moon's shadow axis crosses the Earth in at most about four hours (from memory), so every
// central contact on the ground lies within 2.5 h of greatest eclipse.
const MAX_FROM_GREATEST_MS = 2.5 * 3_600_000

/**
 * The checks for one pinned business date. One app per test file (the test harness keeps one
 * server context per file), so each date has its own spec file calling this.
 */
export async function describeAgelessDemo(date: string) {
  await useApp({ UMBRAFIELD_FIXED_DATE: date })
  describe(`the demo on a business date of ${date} (${TEST_DB})`, () => {
    async function demoTrips() {
      const list = await api('/api/trips')
      expect(list.status).toBe(200)
      const trips = list.body.data.filter((t: { status: string; startDate: string }) => t.status === 'published' && t.startDate > date)
      const ofKind = (kind: string) => trips.find((t: { eclipseId: string }) => byId.get(t.eclipseId)?.type === kind)
      return { total: ofKind('total'), annular: ofKind('annular') }
    }

    it('lists a published total-eclipse trip and a published annular-eclipse trip after that date, both for eclipses in the catalogue', async () => {
      const { total, annular } = await demoTrips()
      expect(total, 'a published total-eclipse trip').toBeTruthy()
      expect(annular, 'a published annular-eclipse trip').toBeTruthy()
      for (const t of [total, annular]) {
        expect(t.eclipseId > date).toBe(true)
        expect(t.startDate <= t.eclipseId && t.eclipseId <= t.endDate).toBe(true)
        expect(t.balanceDueDate < t.startDate).toBe(true)
        expect(t.title).toMatch(/demo/i)
        expect(t.site.name).toMatch(/^Near \S/)
      }
      if (date === '2030-01-01') {
        // The next total and annular eclipses after 1 January 2030 (trade facts, from memory).
        expect(total.eclipseId).toBe('2030-11-25')
        expect(annular.eclipseId).toBe('2030-06-01')
      }
    })

    it.each(['total', 'annular'] as const)('the %s trip has a timetable whose central contacts fall around the catalogue\'s greatest eclipse, at sites on land inside the central path', async (kind) => {
      const trip = (await demoTrips())[kind]
      const cat = byId.get(trip.eclipseId)!
      const t = await api(`/api/trips/${trip.id}/timetable`, { cookie: await signIn(GUIDE) })
      expect(t.status).toBe(200)
      expect(t.body.sites.length).toBeGreaterThanOrEqual(2) // a primary site and at least one fallback
      expect(t.body.sites[0].role).toBe('primary')
      for (const s of t.body.sites) {
        const c = s.contacts
        for (const k of ['c1', 'c2', 'max', 'c3', 'c4']) expect(c[k], `${s.name} ${k}`).toBeTruthy()
        expect(Date.parse(c.c2.utc)).toBeLessThan(Date.parse(c.c3.utc))
        for (const k of ['c2', 'c3']) expect(Math.abs(Date.parse(c[k].utc) - Date.parse(cat.greatestUtc))).toBeLessThan(MAX_FROM_GREATEST_MS)
        expect(isLand(s.lat, s.lon), `${s.name} is on land`).toBe(true)
        const off = pathOffset(cat.el, { latDeg: s.lat, lonDeg: s.lon })
        expect(off, `${s.name} is near the central path`).not.toBeNull()
        // Inside the path: nearer the centreline than the local half-width.
        expect(Math.abs(off!.halfWidthFraction)).toBeLessThan(1)
        expect(off!.limitDistanceKm).toBeGreaterThan(0)
      }
    })

    it.each(['total', 'annular'] as const)('the booked demo traveller reads the %s trip\'s briefing, with the demo cloud covering the site', async (kind) => {
      const trip = (await demoTrips())[kind]
      const b = await api(`/api/trips/${trip.id}/briefing`, { cookie: await signIn(TRAVELLER2) })
      expect(b.status).toBe(200)
      expect(b.body.kind).toBe(kind)
      expect(b.body.site.role).toBe('primary')
      expect(b.body.steps.length).toBeGreaterThan(3)
      expect(b.body.weather.words).toMatch(/clear about \d+ times in 100/)
      expect(b.body.weather.source).toMatch(/Demo data/)
    })
  })
}
