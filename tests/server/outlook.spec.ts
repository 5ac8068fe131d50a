import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/database/connection'
import { DEMO_TRIP_TITLE } from '../../server/database/seed/demo'
import { haversineKm } from '../../shared/geo/distance'
import { advanceClock, api, GUIDE, ORGANISER, signIn, TEST_DB, TEST_PORTS, TRAVELLER, until, useApp } from './app'

// The forecast outlook against the forecast fake (fakes/forecast), on the app's test clock: the
// suite starts on today's date (months before the demo's 2 August 2027 eclipse), then moves the
// clock into the eclipse week.
const { dbTarget } = await useApp()
const db = openDatabase(dbTarget)
const FAKE = `http://127.0.0.1:${TEST_PORTS.fakes.FORECAST_FAKE_PORT}`
const ECLIPSE = '2027-08-02'
/** Into the eclipse week: 06:00 UTC four days before. */
const IN_WEEK = Date.parse('2027-07-29T06:00:00Z')

async function setFake(body: { default: number; points?: Array<{ lat: number; lon: number; cloudCoverPct: number }> }) {
  const r = await fetch(`${FAKE}/_fake/forecast/set`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) })
  expect(r.status).toBe(200)
}

interface Site { siteId: number; name: string; lat: number; lon: number; cloudCoverPct: number | null; trendPct: number | null; pClearClimatology: number | null
  durationSec: number; expectedSec: number | null; reachable: boolean; recommendable: boolean; rank: number; driveMinutes: number; driveSource: string; distanceKm: number; maxUtc: string | null; c2Utc: string | null; arrivalUtc: string }
interface Outlook { forecastRun: { id: number; fetchedAt: string; runs: number } | null; sites: Site[]; recommendation: { siteId: number | null; confidence: string; reason: string } }

let org = ''
let tripId = 0
const site = (o: Outlook, name: string) => o.sites.find((s) => s.name === name)!
async function outlook(): Promise<Outlook> {
  const r = await api<Outlook>(`/api/trips/${tripId}/outlook`, { cookie: org })
  expect(r.status, JSON.stringify(r.body)).toBe(200)
  return r.body
}
async function refresh() {
  const r = await api(`/api/trips/${tripId}/outlook/refresh`, { method: 'POST', cookie: org, body: {} })
  expect(r.status, JSON.stringify(r.body)).toBe(200)
  return r.body as { runId: number }
}

beforeAll(async () => {
  org = await signIn(ORGANISER)
  const trips = await api('/api/trips', { cookie: org })
  tripId = trips.body.data.find((t: { title: string }) => t.title === DEMO_TRIP_TITLE).id
  await fetch(`${FAKE}/_fake/forecast/reset`, { method: 'POST' })
})
afterAll(async () => {
  await fetch(`${FAKE}/_fake/forecast/reset`, { method: 'POST' })
  await db.destroy()
})

describe(`the forecast outlook (${TEST_DB})`, () => {
  it('answers 409 too_early with the days to wait while the eclipse is more than seven days away', async () => {
    const today = (await advanceClock(0)).slice(0, 10)
    const days = Math.round((Date.parse('2027-07-26') - Date.parse(today)) / 86_400_000)
    expect(days).toBeGreaterThan(0)
    const r = await api(`/api/trips/${tripId}/outlook`, { cookie: org })
    expect(r.status).toBe(409)
    expect(r.body.data).toMatchObject({ code: 'too_early', daysToWait: days, opensOn: '2027-07-26' })
    const f = await api(`/api/trips/${tripId}/outlook/refresh`, { method: 'POST', cookie: org, body: {} })
    expect(f.status).toBe(409)
    expect(f.body.data.code).toBe('too_early')
    // Nothing was fetched for it.
    expect(await db.selectFrom('forecast_runs').select('id').where('trip_id', '=', tripId).execute()).toEqual([])
  })

  it('the schedule fetches hourly from seven days before and keeps each run', async () => {
    await setFake({ default: 40 })
    const now = Date.parse(await advanceClock(0))
    await advanceClock(IN_WEEK - now)
    const runs = () => db.selectFrom('forecast_runs').selectAll().where('trip_id', '=', tripId).orderBy('id').execute()
    const first = await until(runs, (r) => r.length >= 1, 20_000)
    expect(first).toHaveLength(1)
    // Within the hour nothing more is fetched; an hour later the next run comes, and the first stays.
    await advanceClock(30 * 60_000)
    await new Promise((r) => setTimeout(r, 2500)) // two housekeeping ticks (1 s in tests): none may fetch
    expect(await runs()).toHaveLength(1)
    await advanceClock(31 * 60_000)
    const two = await until(runs, (r) => r.length >= 2, 20_000)
    expect(two).toHaveLength(2)
    expect(two.map((r) => r.cause)).toEqual(['schedule', 'schedule'])
    expect(Date.parse(two[1]!.fetched_at) - Date.parse(two[0]!.fetched_at)).toBeGreaterThanOrEqual(3_600_000)
    for (const r of two) {
      const values = await db.selectFrom('forecast_values').selectAll().where('run_id', '=', r.id).execute()
      expect(values).toHaveLength(3) // the primary and both fallbacks
      for (const v of values) expect(v.cloud_pct).toBe(40)
    }
    const o = await outlook()
    expect(o.forecastRun?.runs).toBe(2)
    expect(o.sites.every((s) => s.trendPct === 0)).toBe(true)
  })

  it('refresh is for organisers only', async () => {
    const path = `/api/trips/${tripId}/outlook/refresh`
    expect((await api(path, { method: 'POST', body: {} })).status).toBe(401)
    expect((await api(path, { method: 'POST', body: {}, cookie: await signIn(TRAVELLER) })).status).toBe(403)
    const guide = await signIn(GUIDE)
    expect((await api(path, { method: 'POST', body: {}, cookie: guide })).status).toBe(403)
    // The trip's guide reads the outlook; a traveller does not.
    expect((await api(`/api/trips/${tripId}/outlook`, { cookie: guide })).status).toBe(200)
    expect((await api(`/api/trips/${tripId}/outlook`, { cookie: await signIn(TRAVELLER) })).status).toBe(403)
    const before = (await outlook()).forecastRun!.runs
    await refresh()
    expect((await outlook()).forecastRun!.runs).toBe(before + 1)
  })

  it('the set cloud decides the recommendation: clear at a fallback and cloud at the primary send the group to the fallback', async () => {
    const o0 = await outlook()
    const luxor = site(o0, 'Luxor West Bank'), qena = site(o0, 'Qena plateau')
    await setFake({ default: 90, points: [{ lat: qena.lat, lon: qena.lon, cloudCoverPct: 5 }] })
    await refresh()
    const o1 = await outlook()
    expect(site(o1, 'Qena plateau').cloudCoverPct).toBe(5)
    expect(site(o1, 'Luxor West Bank').cloudCoverPct).toBe(90)
    expect(o1.recommendation.siteId).toBe(qena.siteId)
    expect(site(o1, 'Qena plateau').rank).toBe(1)
    // And back: clear at the primary, cloud at the fallbacks.
    await setFake({ default: 90, points: [{ lat: luxor.lat, lon: luxor.lon, cloudCoverPct: 5 }] })
    await refresh()
    const o2 = await outlook()
    expect(o2.recommendation.siteId).toBe(luxor.siteId)
    expect(o2.recommendation.reason).toContain('Luxor West Bank')
  })

  it('the trend is the change between the last two runs', async () => {
    const o0 = await outlook()
    const luxor = site(o0, 'Luxor West Bank'), qena = site(o0, 'Qena plateau')
    await setFake({ default: 50, points: [{ lat: luxor.lat, lon: luxor.lon, cloudCoverPct: 20 }, { lat: qena.lat, lon: qena.lon, cloudCoverPct: 70 }] })
    await refresh()
    await setFake({ default: 50, points: [{ lat: luxor.lat, lon: luxor.lon, cloudCoverPct: 45 }, { lat: qena.lat, lon: qena.lon, cloudCoverPct: 10 }] })
    await refresh()
    const o = await outlook()
    expect(site(o, 'Luxor West Bank').trendPct).toBe(45 - 20)
    expect(site(o, 'Qena plateau').trendPct).toBe(10 - 70)
    expect(site(o, 'Sohag farmland').trendPct).toBe(0)
  })

  it('expected seconds = duration × (1 − cloud/100), blended towards climatology with the documented weight', async () => {
    const o = await outlook()
    const setCloud: Record<string, number> = { 'Luxor West Bank': 45, 'Qena plateau': 10, 'Sohag farmland': 50 }
    const ws = await api(`/api/workspaces/${(await db.selectFrom('trips').select('workspace_id').where('id', '=', tripId).executeTakeFirstOrThrow()).workspace_id}/sites`, { cookie: org })
    for (const s of o.sites) {
      // Duration and time of maximum from the public local-circumstances route; P(clear) from the workspace's climatology.
      const local = await api(`/api/eclipses/${ECLIPSE}/local?lat=${s.lat}&lon=${s.lon}`)
      expect(s.durationSec).toBe(local.body.durationSec)
      const climate = ws.body.data.find((x: { id: number }) => x.id === s.siteId).metrics.pClear as number
      expect(s.pClearClimatology).toBe(climate)
      expect(climate).toBeGreaterThan(0)
      // README: w = max(0, 1 − lead hours / 240), lead from the run's fetch to the site's maximum.
      const leadHours = (Date.parse(local.body.max.utc) - Date.parse(o.forecastRun!.fetchedAt)) / 3_600_000
      expect(leadHours).toBeGreaterThan(24)
      const w = Math.max(0, 1 - leadHours / 240)
      const cloud = setCloud[s.name]!
      expect(s.cloudCoverPct).toBe(cloud)
      const want = s.durationSec * (w * (1 - cloud / 100) + (1 - w) * climate)
      // The route rounds to 0.1 s.
      expect(Math.abs(s.expectedSec! - want)).toBeLessThanOrEqual(0.05 + 1e-9)
      // Not the forecast alone, nor the climatology alone.
      expect(Math.abs(s.expectedSec! - s.durationSec * (1 - cloud / 100))).toBeGreaterThan(1)
    }
  })

  it('a site the group cannot reach before C2 is marked and never recommended', async () => {
    const o0 = await outlook()
    const sohag = site(o0, 'Sohag farmland')
    // Sohag: an entered drive of 10 h from the 03:30 UTC meeting. Jeddah (added to the outlook, across the Red Sea): the estimate.
    expect((await api(`/api/trips/${tripId}/outlook/sites/${sohag.siteId}`, { method: 'PUT', cookie: org, body: { driveMinutes: 600 } })).status).toBe(200)
    const jeddah = await db.selectFrom('sites').selectAll().where('name', '=', 'Jeddah corniche').executeTakeFirstOrThrow()
    const put = await api(`/api/trips/${tripId}/outlook/sites/${jeddah.id}`, { method: 'PUT', cookie: org, body: { driveMinutes: null } })
    expect(put.status).toBe(200)
    expect(put.body.added).toBe(true)
    // Clear only where the group cannot get in time; thick cloud at the reachable sites.
    await setFake({ default: 100, points: [{ lat: sohag.lat, lon: sohag.lon, cloudCoverPct: 0 }, { lat: jeddah.lat, lon: jeddah.lon, cloudCoverPct: 0 }] })
    for (let i = 0; i < 2; i++) {
      await refresh()
      const o = await outlook()
      const s = site(o, 'Sohag farmland'), j = site(o, 'Jeddah corniche')
      expect(s.driveSource).toBe('entered')
      expect(s.driveMinutes).toBe(600)
      expect(j.driveSource).toBe('estimated')
      // README: straight-line distance from the meeting point × 1.3 at 60 km/h.
      const trip = await db.selectFrom('trips').selectAll().where('id', '=', tripId).executeTakeFirstOrThrow()
      const km = haversineKm(trip.meeting_lat, trip.meeting_lon, jeddah.lat, jeddah.lon)
      expect(Math.abs(j.distanceKm - km)).toBeLessThanOrEqual(0.05 + 1e-9)
      expect(Math.abs(j.driveMinutes - (j.distanceKm * 1.3 / 60) * 60)).toBeLessThanOrEqual(0.5)
      for (const x of [s, j]) {
        expect(x.cloudCoverPct).toBe(0)
        expect(Date.parse(x.arrivalUtc)).toBeGreaterThan(Date.parse(x.c2Utc!))
        expect(x.reachable).toBe(false)
        expect(x.recommendable).toBe(false)
        expect(o.recommendation.siteId).not.toBe(x.siteId)
      }
      // They would have had the most expected seconds, yet rank after every reachable site.
      const reachable = o.sites.filter((x) => x.reachable)
      expect(reachable.length).toBeGreaterThan(0)
      expect(Math.max(...reachable.map((x) => x.rank))).toBeLessThan(Math.min(s.rank, j.rank))
      expect(s.expectedSec!).toBeGreaterThan(Math.max(...reachable.map((x) => x.expectedSec!)))
      expect(o.recommendation.reason).toMatch(/cannot be reached before C2/)
    }
    // Taking the added site off the outlook removes it; clearing Sohag's drive time brings back the estimate.
    expect((await api(`/api/trips/${tripId}/outlook/sites/${jeddah.id}`, { method: 'DELETE', cookie: org })).body.removed).toBe(true)
    expect((await api(`/api/trips/${tripId}/outlook/sites/${sohag.siteId}`, { method: 'DELETE', cookie: org })).body.removed).toBe(true)
    const after = await outlook()
    expect(after.sites.map((x) => x.name)).not.toContain('Jeddah corniche')
    expect(site(after, 'Sohag farmland').driveSource).toBe('estimated')
  })

  it('a site from another workspace cannot be added (404), and bad drive times name the field', async () => {
    const other = await db.selectFrom('sites').innerJoin('workspaces', 'workspaces.id', 'sites.workspace_id').select('sites.id')
      .where('workspaces.eclipse_id', '!=', ECLIPSE).executeTakeFirstOrThrow()
    expect((await api(`/api/trips/${tripId}/outlook/sites/${other.id}`, { method: 'PUT', cookie: org, body: {} })).status).toBe(404)
    const bad = await api(`/api/trips/${tripId}/outlook/sites/${other.id}`, { method: 'PUT', cookie: org, body: { driveMinutes: -5 } })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fields).toHaveProperty('driveMinutes')
  })
})
