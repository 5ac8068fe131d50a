import { url } from '@nuxt/test-utils/e2e'
import { afterAll, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/database/connection'
import { ridgeTiff } from '../../server/database/seed/demoTerrain'
import { haversineKm } from '../../shared/geo/distance'
import { api, ORGANISER, signIn, TEST_DB, useApp } from './app'

const { dbTarget } = await useApp()
const db = openDatabase(dbTarget)
afterAll(() => db.destroy())

const LUXOR = { lat: 25.6872, lon: 32.6396 }
interface Spot { lat: number; lon: number; durationSec: number; expectedSec: number | null; distanceKm: number; extraSecPer50Km: number | null }
const measure = (s: Spot) => s.expectedSec ?? s.durationSec

const tripBody = (primarySiteId: number, title: string, backupSiteIds: number[] = []) => ({
  workspaceId: 1, primarySiteId, backupSiteIds, title, startDate: '2027-07-31', endDate: '2027-08-03', seats: 5,
  priceMinor: 100, depositMinor: 10, currency: 'eur', balanceDueDate: '2027-05-01',
  meetingPoint: { name: 'Hotel lobby', lat: 25.7, lon: 32.6, time: '2027-08-02T08:00:00+02:00' },
})

async function uploadTerrain(name: string, data: Uint8Array, cookie: string) {
  const form = new FormData()
  form.append('name', name)
  form.append('file', new Blob([data as BlobPart]), 'terrain.tif')
  const res = await fetch(url('/api/workspaces/1/terrain'), { method: 'POST', body: form, headers: { cookie } })
  return res.status
}

describe(`best spots are distinct places (${TEST_DB})`, () => {
  it('keeps the default 25 km between spots, and honours minSeparationKm', async () => {
    const org = await signIn(ORGANISER)
    for (const [sep, query] of [[25, ''], [60, '&minSeparationKm=60']] as const) {
      const r = await api(`/api/workspaces/1/best-spots?lat=${LUXOR.lat}&lon=${LUXOR.lon}&radiusKm=150&limit=5&minSunAltitudeDeg=10${query}`, { cookie: org })
      expect(r.status).toBe(200)
      expect(r.body.meta.separationKm).toBe(sep)
      const spots = r.body.data as Spot[]
      expect(spots.length, `separation ${sep}`).toBeGreaterThanOrEqual(3)
      let pairs = 0
      for (let i = 0; i < spots.length; i++) {
        for (let j = i + 1; j < spots.length; j++) {
          pairs++
          expect(haversineKm(spots[i]!.lat, spots[i]!.lon, spots[j]!.lat, spots[j]!.lon), `spots ${i + 1} and ${j + 1}`).toBeGreaterThanOrEqual(sep)
        }
      }
      expect(pairs).toBe((spots.length * (spots.length - 1)) / 2)
    }
    const bad = await api(`/api/workspaces/1/best-spots?lat=${LUXOR.lat}&lon=${LUXOR.lon}&minSeparationKm=0`, { cookie: org })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fields.minSeparationKm).toBeTruthy()
  })

  it('says how many seconds each extra 50 km buys, from the spots\' own figures, and lists near-ties nearest first', async () => {
    const org = await signIn(ORGANISER)
    const r = await api(`/api/workspaces/1/best-spots?lat=${LUXOR.lat}&lon=${LUXOR.lon}&radiusKm=200&limit=6&minSunAltitudeDeg=10`, { cookie: org })
    expect(r.status).toBe(200)
    const spots = r.body.data as Spot[]
    expect(spots.length).toBeGreaterThanOrEqual(3)
    const nearest = spots.reduce((a, b) => (b.distanceKm < a.distanceKm ? b : a))
    const best = spots.reduce((a, b) => (measure(b) > measure(a) ? b : a))
    const slope = (s: Spot) => ((measure(s) - measure(nearest)) / (s.distanceKm - nearest.distanceKm)) * 50
    const want = best === nearest ? 0 : slope(best)
    // The figure is given to 0.1 s: it may differ from the unrounded one by half of that.
    expect(Math.abs(r.body.meta.secondsPer50Km - want)).toBeLessThanOrEqual(0.05 + 1e-9)
    for (const s of spots) {
      if (s === nearest) expect(s.extraSecPer50Km).toBeNull()
      else expect(Math.abs(s.extraSecPer50Km! - slope(s))).toBeLessThanOrEqual(0.05 + 1e-9)
    }
    expect(r.body.meta.trade).toMatch(want > 0 ? new RegExp(`${r.body.meta.secondsPer50Km.toFixed(1)} s for each extra 50 km`) : /nearest spot is also the best/)
    // Each spot is the nearest of those left that lie within tieSec of the best left.
    const tie = r.body.meta.tieSec as number
    expect(tie).toBeGreaterThan(0)
    for (let i = 0; i < spots.length; i++) {
      const left = spots.slice(i)
      const top = Math.max(...left.map(measure))
      const near = left.filter((s) => top - measure(s) <= tie)
      expect(spots[i]!.distanceKm, `spot ${i + 1}`).toBe(Math.min(...near.map((s) => s.distanceKm)))
    }
  })
})

describe(`site names made up by the planning page (${TEST_DB})`, () => {
  it('blocks publishing a trip until the site is renamed, naming the site', async () => {
    const org = await signIn(ORGANISER)
    const auto = 'Best ground 1 (25.900, 32.700)'
    const site = await api('/api/workspaces/1/sites', { method: 'POST', cookie: org, body: { name: auto, lat: 25.9, lon: 32.7 } })
    expect(site.status).toBe(201)
    const sites = (await api('/api/workspaces/1/sites', { cookie: org })).body.data as Array<{ id: number; name: string; nameAutomatic: boolean }>
    expect(sites.find((s) => s.id === site.body.id)!.nameAutomatic).toBe(true)
    expect(sites.filter((s) => s.nameAutomatic).map((s) => s.name)).toEqual([auto])

    const trip = await api('/api/trips', { method: 'POST', cookie: org, body: tripBody(4, 'Nile valley, named sites only', [site.body.id]) })
    expect(trip.status).toBe(201)
    const refused = await api(`/api/trips/${trip.body.id}/publish`, { method: 'POST', cookie: org })
    expect(refused.status).toBe(400)
    expect(refused.body.data.code).toBe('site_name_automatic')
    expect(refused.body.data.fields.sites).toContain(`"${auto}"`)
    expect(refused.body.message).toContain(auto)
    expect((await db.selectFrom('trips').select('status').where('id', '=', trip.body.id).executeTakeFirstOrThrow()).status).not.toBe('published')

    // Saving the form without touching the name keeps the block.
    expect((await api(`/api/sites/${site.body.id}`, { method: 'PATCH', cookie: org, body: { name: auto, notes: 'flat gravel' } })).status).toBe(200)
    expect((await api(`/api/trips/${trip.body.id}/publish`, { method: 'POST', cookie: org })).status).toBe(400)
    const renamed = await api(`/api/sites/${site.body.id}`, { method: 'PATCH', cookie: org, body: { name: 'Qena gravel plain' } })
    expect(renamed.body.nameAutomatic).toBe(false)
    const ok = await api(`/api/trips/${trip.body.id}/publish`, { method: 'POST', cookie: org })
    expect(ok.status).toBe(200)
    expect(ok.body.status).toBe('published')
  })
})

describe(`heights that were never set (${TEST_DB})`, () => {
  it('shows "not set" (null), says what the timetable assumes, and fills it from the terrain model', async () => {
    const org = await signIn(ORGANISER)
    const at = { lat: 26.02, lon: 32.28 }
    const created = await api('/api/workspaces/1/sites', { method: 'POST', cookie: org, body: { name: 'Dishna fields', ...at } })
    expect(created.status).toBe(201)
    const id = created.body.id as number
    const one = async () => ((await api('/api/workspaces/1/sites', { cookie: org })).body.data as Array<Record<string, unknown>>).find((s) => s.id === id)!
    const fresh = await one()
    expect(fresh.elevationM).toBeNull()
    expect(fresh.elevationSource).toBeNull()
    expect(fresh.assumedElevationM).toBe(0)
    // A demo site whose height was given keeps it.
    const luxor = ((await api('/api/workspaces/1/sites', { cookie: org })).body.data as Array<Record<string, unknown>>).find((s) => String(s.name).startsWith('Luxor'))!
    expect(luxor.elevationM).toBe(80)
    expect(luxor.elevationSource).toBe('given')

    const trip = await api('/api/trips', { method: 'POST', cookie: org, body: tripBody(id, 'Heights check') })
    expect(trip.status).toBe(201)
    const tt = await api(`/api/trips/${trip.body.id}/timetable`, { cookie: org })
    expect(tt.body.sites[0].elevationSet).toBe(false)
    expect(tt.body.sites[0].heightNote).toMatch(/not set.*sea level \(0 m\)/)

    // No model covers it yet: a 400 naming the height field, and nothing changes.
    const none = await api(`/api/sites/${id}/height-from-terrain`, { method: 'POST', cookie: org })
    expect(none.status).toBe(400)
    expect(none.body.data.fields.elevationM).toMatch(/terrain model/)
    expect((await one()).elevationM).toBeNull()

    // An invented flat model at 347 m around the site (with a ridge far off to the north).
    expect(await uploadTerrain('Flat plain 347 m (test)', ridgeTiff({ ...at, azimuthDeg: 0, distanceKm: 4, heightM: 600, groundM: 347 }), org)).toBe(201)
    const filled = await api(`/api/sites/${id}/height-from-terrain`, { method: 'POST', cookie: org })
    expect(filled.status).toBe(200)
    expect(filled.body.elevationM).toBe(347)
    expect(filled.body.elevationSource).toBe('terrain')
    const tt2 = await api(`/api/trips/${trip.body.id}/timetable`, { cookie: org })
    expect(tt2.body.sites[0].elevationSet).toBe(true)
    expect(tt2.body.sites[0].elevationM).toBe(347)
    expect(tt2.body.sites[0].heightNote).toBeNull()

    // 0 m typed by a person is a height; null makes it "not set" again.
    expect((await api(`/api/sites/${id}`, { method: 'PATCH', cookie: org, body: { elevationM: 0 } })).body).toMatchObject({ elevationM: 0, elevationSource: 'given' })
    expect((await api(`/api/sites/${id}`, { method: 'PATCH', cookie: org, body: { elevationM: null } })).body).toMatchObject({ elevationM: null, elevationSource: null })
  })
})

describe(`forms speak plainly (${TEST_DB})`, () => {
  const raw = /Invalid (body|query|path)|\b(seats|radiusKm|minSeparationKm|capacity|lat|password):/

  it('names the field in words in every 400, with the message beside its key', async () => {
    const trav = await signIn('traveller@umbrafield.test')
    const org = await signIn(ORGANISER)
    const seats = await api('/api/trips/1/bookings', { method: 'POST', cookie: trav, body: { seats: 0 } })
    expect(seats.status).toBe(400)
    expect(seats.body.data.fields.seats).toBe('Choose at least one seat')
    expect(seats.body.message).toBe('Choose at least one seat')
    const cases: Array<[string, Promise<{ status: number; body: any }>, string, RegExp]> = [
      ['search radius', api(`/api/workspaces/1/best-spots?lat=${LUXOR.lat}&lon=${LUXOR.lon}&radiusKm=far`, { cookie: org }), 'radiusKm', /^The search radius must be a number$/],
      ['separation', api(`/api/workspaces/1/best-spots?lat=${LUXOR.lat}&lon=${LUXOR.lon}&minSeparationKm=900`, { cookie: org }), 'minSeparationKm', /^The distance between spots must be 1–500 km$/],
      ['latitude', api('/api/workspaces/1/sites', { method: 'POST', cookie: org, body: { name: 'Too far north', lat: 95, lon: 10 } }), 'lat', /^Latitude must be −90 to 90°$/],
      ['capacity', api('/api/workspaces/1/sites', { method: 'POST', cookie: org, body: { name: 'Crowded', lat: 25, lon: 32, capacity: 1.5 } }), 'capacity', /^Capacity must be a whole number of people$/],
      // A check with no message of its own gets the plain fallback (the current password's length cap; nothing changes).
      ['fallback', api('/api/me', { method: 'PATCH', cookie: trav, body: { currentPassword: 'p'.repeat(300) } }), 'currentPassword', /^Current password is too long \(at most 200 characters\)$/],
    ]
    for (const [what, pending, field, want] of cases) {
      const r = await pending
      expect(r.status, what).toBe(400)
      expect(r.body.data.fields[field], what).toMatch(want)
      expect(r.body.message, what).not.toMatch(raw)
      expect(r.body.message, what).toContain(r.body.data.fields[field])
    }
  })
})

describe(`climatology coverage (${TEST_DB})`, () => {
  async function uploadGrid(name: string, csv: string, cookie: string) {
    const form = new FormData()
    form.append('name', name)
    form.append('source', 'test fixture (invented)')
    form.append('file', new Blob([csv]), 'grid.csv')
    const res = await fetch(url('/api/climatology'), { method: 'POST', body: form, headers: { cookie } })
    return { status: res.status, body: await res.json() }
  }
  const grid = (lats: number[], lons: number[], month: number) =>
    ['lat,lon,month,cloud_pct', ...lats.flatMap((la) => lons.map((lo) => `${la},${lo},${month},30`))].join('\n')

  it('warns once, naming the missing month or the places outside the grid, and not when covered', async () => {
    const org = await signIn(ORGANISER)
    const before = (await api('/api/workspaces/1', { cookie: org })).body
    expect(before.coverage.warning).toBeNull()
    expect(before.coverage.monthName).toBe('August')

    const march = await uploadGrid('March only (test)', grid([20, 40], [0, 50], 3), org)
    expect(march.status).toBe(201)
    expect((await api('/api/workspaces/1', { method: 'PATCH', cookie: org, body: { climatologyId: march.body.id } })).status).toBe(200)
    const noMonth = (await api('/api/workspaces/1', { cookie: org })).body.coverage
    expect(noMonth.missing).toBe('month')
    expect(noMonth.warning).toMatch(/"March only \(test\)" has no data for August, the eclipse month \(it holds March\)/)

    // August data, but only over the Strait of Gibraltar (35–37° N, 7–5° W): the Nile sites lie outside it.
    const strait = await uploadGrid('Strait only (test)', grid([35, 37], [-7, -5], 8), org)
    expect(strait.status).toBe(201)
    await api('/api/workspaces/1', { method: 'PATCH', cookie: org, body: { climatologyId: strait.body.id } })
    const partly = (await api('/api/workspaces/1', { cookie: org })).body.coverage
    expect(partly.missing).toBe('region')
    expect(partly.warning).toMatch(/no August data at some of its sites \(.*Luxor West Bank/)
    expect(partly.warning).not.toMatch(/Tarifa/)

    await api('/api/workspaces/1', { method: 'PATCH', cookie: org, body: { climatologyId: before.climatologyId } })
    expect((await api('/api/workspaces/1', { cookie: org })).body.coverage.warning).toBeNull()
  })
})
