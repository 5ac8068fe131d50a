import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs'
import { url } from '@nuxt/test-utils/e2e'
import { afterAll, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/database/connection'
import { localCircumstances } from '../../shared/eclipse/local'
import { courseTrack, movingLocalCircumstances } from '../../shared/eclipse/moving'
import { computedElementsFor } from '../../server/eclipse/catalogue'
import { resolveTimeBasis } from '../../server/eclipse/report'
import { api, GUIDE, inviteAndChoosePassword, ORGANISER, signIn, TRAVELLER, useApp } from './app'

const { dbTarget } = await useApp()
const db = openDatabase(dbTarget)
afterAll(() => db.destroy())

// The demo workspace plans 2 August 2027; a ship out of Málaga the evening before (demo voyage).
const MALAGA = { lat: 36.70, lon: -4.40, utc: '2027-08-01T20:00:00Z' }
const el = computedElementsFor('2027-08-02')!
const dt = resolveTimeBasis(el, null)

async function pdfText(buf: ArrayBuffer) {
  const doc = await getDocument({ data: new Uint8Array(buf), useSystemFonts: false, isEvalSupported: false }).promise
  const pages: string[] = []
  for (let i = 1; i <= doc.numPages; i++) {
    const tc = await (await doc.getPage(i)).getTextContent()
    pages.push(tc.items.map((it) => ('str' in it ? it.str : '')).join(' '))
  }
  return pages.join(' ').replace(/\s+/g, ' ')
}

/** Whole second, half up (the one rounding the app documents), then the clock in UTC and in the zone, by Intl directly. */
function clocks(utcMs: number, zone: string) {
  const ms = Math.floor(utcMs / 1000 + 0.5) * 1000
  const local = new Intl.DateTimeFormat('en-GB', { timeZone: zone, hour: '2-digit', minute: '2-digit', second: '2-digit', hourCycle: 'h23' }).format(new Date(ms))
  return { utc: new Date(ms).toISOString().slice(11, 19), local }
}

describe('voyages', () => {
  it('an organiser plans a voyage: 201 with the intercept, a water route, departBy and alternatives; GET returns the same', async () => {
    const org = await signIn(ORGANISER)
    const r = await api('/api/workspaces/1/voyages', { method: 'POST', cookie: org, body: { name: 'Alboran intercept (demo)', departure: MALAGA, speedKn: 16, returnTo: { lat: 36.7, lon: -4.4 }, holdCourse: { headingDeg: 95, speedKn: 12 } } })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    const v = r.body
    expect(v.route.type).toBe('LineString')
    expect(v.route.coordinates[0]).toEqual([MALAGA.lon, MALAGA.lat])
    expect(v.route.coordinates.at(-1)).toEqual([v.intercept.lon, v.intercept.lat])
    // The intercept's figures are the local circumstances there (the workspace's demo climatology gives P(clear)).
    const lc = localCircumstances(el, { latDeg: v.intercept.lat, lonDeg: v.intercept.lon }, dt.deltaTSec, dt.ttMinusClockSec)
    expect(Math.abs(lc.durationSec - v.intercept.durationSec)).toBeLessThanOrEqual(1)
    expect(v.intercept.utc).toBe(new Date(lc.max!.utcMs).toISOString())
    expect(v.intercept.pClear).toBeGreaterThan(0)
    expect(v.intercept.expectedSec).toBeCloseTo(v.intercept.durationSec * v.intercept.pClear, 0)
    expect(Date.parse(v.departBy)).toBeGreaterThanOrEqual(Date.parse(MALAGA.utc))
    expect(Date.parse(v.departBy)).toBeLessThan(lc.c1!.utcMs - 30 * 60_000)
    expect(v.alternatives.length).toBeGreaterThan(0)
    expect(v.alternatives.length).toBeLessThanOrEqual(3)
    expect(v.homeward.distanceNm).toBeGreaterThan(0)
    expect(v.underway.speedKn).toBe(12)
    // The timetable treats the voyage like a site: ship's time and UTC name the same second, and any
    // filters-off cue lies strictly inside C2..C3 (stopped, and under way with the course held).
    const tt = v.timetable
    expect(tt.kind).toBe('total')
    expect(tt.safety.join(' ')).toMatch(/ISO 12312-2/)
    for (const k of ['c1', 'c2', 'max', 'c3', 'c4']) {
      const c = tt.contacts[k]
      expect(Date.parse(`${c.local.replace(" ", "T")}${c.utcOffset}`), k).toBe(Math.round(Date.parse(c.utc) / 1000) * 1000)
    }
    const inside = (cues: Array<{ filters: string; utc: string }>, c2: string, c3: string) => {
      for (const q of cues.filter((x) => x.filters === 'off')) {
        expect(Date.parse(q.utc)).toBeGreaterThan(Date.parse(c2))
        expect(Date.parse(q.utc)).toBeLessThan(Date.parse(c3))
      }
    }
    inside(tt.cues, tt.contacts.c2.utc, tt.contacts.c3.utc)
    expect(tt.underway.contacts.c2.utc).not.toBe(tt.contacts.c2.utc)
    inside(tt.underway.cues, tt.underway.contacts.c2.utc, tt.underway.contacts.c3.utc)
    const g = await api(`/api/voyages/${v.id}`, { cookie: org })
    expect(g.status).toBe(200)
    expect(g.body).toEqual(v)
    const list = await api('/api/workspaces/1/voyages', { cookie: org })
    expect(list.body.data.some((x: { id: number }) => x.id === v.id)).toBe(true)
    // The trip's guide sees it (the demo workspace is theirs); a traveller may not plan or look.
    expect((await api(`/api/voyages/${v.id}`, { cookie: await signIn(GUIDE) })).status).toBe(200)
    const trav = await signIn(TRAVELLER)
    expect((await api(`/api/voyages/${v.id}`, { cookie: trav })).status).toBe(403)
    expect((await api('/api/workspaces/1/voyages', { method: 'POST', cookie: trav, body: { name: 'x', departure: MALAGA, speedKn: 16 } })).status).toBe(403)
    expect(await db.selectFrom('voyages').select('id').where('id', '=', v.id).executeTakeFirst()).toBeTruthy()
  })

  it('the voyage timetable PDF gives every contact in ship\'s time and UTC, stopped and under way, with the safety text', async () => {
    const org = await signIn(ORGANISER)
    const hold = { headingDeg: 95, speedKn: 12 }
    const v = (await api('/api/workspaces/1/voyages', { method: 'POST', cookie: org, body: { name: 'PDF check (demo)', departure: MALAGA, speedKn: 16, holdCourse: hold } })).body
    const res = await fetch(url(`/api/voyages/${v.id}/timetable.pdf`), { headers: { cookie: org } })
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toBe('application/pdf')
    const text = await pdfText(await res.arrayBuffer())
    const zone = v.timetable.zone as string
    // The contacts from the engine itself, at the intercept at sea level; the API gives them to the tenth of a second.
    const lc = localCircumstances(el, { latDeg: v.intercept.lat, lonDeg: v.intercept.lon, elevationM: 0 }, dt.deltaTSec, dt.ttMinusClockSec)
    for (const k of ['c1', 'c2', 'max', 'c3', 'c4'] as const) {
      expect(Math.abs(Date.parse(v.timetable.contacts[k].utc) - lc[k]!.utcMs), k).toBeLessThanOrEqual(50)
      const c = clocks(Date.parse(v.timetable.contacts[k].utc), zone)
      expect(text, `${k} ${c.local} / ${c.utc}`).toContain(`${c.local} ${c.utc}`)
    }
    // Under way: the moving observer's contacts, computed here from the course held through maximum.
    const m = movingLocalCircumstances(el, courseTrack({ latDeg: v.intercept.lat, lonDeg: v.intercept.lon, elevationM: 0 }, Date.parse(v.intercept.utc), hold.headingDeg, hold.speedKn),
      dt.deltaTSec, dt.ttMinusClockSec, Date.parse(v.intercept.utc))
    for (const k of ['c1', 'c2', 'max', 'c3', 'c4'] as const) {
      // The plan stores these to the whole millisecond (a Date truncates), then the one rounding to the second.
      const c = clocks(Math.trunc(m[k]!.utcMs), zone)
      expect(text, `under way ${k}`).toContain(`${c.local} ${c.utc}`)
    }
    const offset = v.timetable.contacts.max.utcOffset as string
    expect(text).toContain(`UTC${offset}`)
    expect(text).toMatch(/ISO 12312-2/)
    expect(text).toContain(`${v.distanceNm} nm`)
    expect(text).toContain(`Keeping way`)
    // Every filters-off cue of the plan is printed with its ship's time.
    for (const q of v.timetable.cues) expect(text).toContain(clocks(Date.parse(q.utc), zone).local)
    // A traveller may not have it; a guide of no trip in the workspace finds nothing.
    expect((await fetch(url(`/api/voyages/${v.id}/timetable.pdf`), { headers: { cookie: await signIn(TRAVELLER) } })).status).toBe(403)
    expect((await fetch(url(`/api/voyages/${v.id}/timetable.pdf?paper=folio`), { headers: { cookie: org } })).status).toBe(400)
  })

  it('a guide of no trip in the workspace gets 404', async () => {
    const org = await signIn(ORGANISER)
    const v = await api('/api/workspaces/1/voyages', { method: 'POST', cookie: org, body: { name: 'Scope check (demo)', departure: MALAGA, speedKn: 16 } })
    const email = `voyage-guide-${Date.now()}@umbrafield.test`
    expect((await inviteAndChoosePassword(org, { name: 'Voyage guide (test)', email, role: 'guide' }, 'voyage-guide-password')).status).toBe(201)
    expect((await api(`/api/voyages/${v.body.id}`, { cookie: await signIn(email, 'voyage-guide-password') })).status).toBe(404)
  })

  it('an unreachable request is 422 with data.code unreachable and the reason; nothing is stored', async () => {
    const org = await signIn(ORGANISER)
    const before = Number((await db.selectFrom('voyages').select((eb) => eb.fn.countAll().as('n')).executeTakeFirstOrThrow()).n)
    const late = await api('/api/workspaces/1/voyages', { method: 'POST', cookie: org, body: { name: 'Too late', departure: { ...MALAGA, utc: '2027-08-02T07:30:00Z' }, speedKn: 16 } })
    expect(late.status).toBe(422)
    expect(late.body.data).toMatchObject({ code: 'unreachable', reason: 'too_far' })
    expect(late.body.message).toMatch(/30 minutes before C1/)
    const inland = await api('/api/workspaces/1/voyages', { method: 'POST', cookie: org, body: { name: 'Inland', departure: { lat: 25, lon: 10, utc: '2027-08-01T00:00:00Z' }, speedKn: 16 } })
    expect(inland.status).toBe(422)
    expect(inland.body.data.reason).toBe('departure_not_at_sea')
    const after = Number((await db.selectFrom('voyages').select((eb) => eb.fn.countAll().as('n')).executeTakeFirstOrThrow()).n)
    expect(after).toBe(before)
  })

  it('bad input is 400 naming the field', async () => {
    const org = await signIn(ORGANISER)
    const r = await api('/api/workspaces/1/voyages', { method: 'POST', cookie: org, body: { name: 'Bad', departure: { ...MALAGA, utc: 'tomorrow' }, speedKn: 0 } })
    expect(r.status).toBe(400)
    expect(Object.keys(r.body.data.fields)).toEqual(expect.arrayContaining(['departure.utc', 'speedKn']))
  })
})
