import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs'
import { describe, expect, it } from 'vitest'
import { url } from '@nuxt/test-utils/e2e'
import { api, GUIDE, inviteAndChoosePassword, ORGANISER, signIn, TRAVELLER, useApp } from './app'

await useApp()

async function pdfText(buf: ArrayBuffer) {
  const doc = await getDocument({ data: new Uint8Array(buf), useSystemFonts: false, isEvalSupported: false }).promise
  const pages: string[] = []
  for (let i = 1; i <= doc.numPages; i++) {
    const tc = await (await doc.getPage(i)).getTextContent()
    pages.push(tc.items.map((it) => ('str' in it ? it.str : '')).join(' '))
  }
  return pages
}

const shift = (utc: string, hours: number) => new Date(Math.round(Date.parse(utc) / 1000) * 1000 + hours * 3600_000).toISOString().slice(0, 19).replace('T', ' ')

describe('contact timetable', () => {
  it('is open to organisers and the trip’s guides only', async () => {
    expect((await api('/api/trips/1/timetable', { cookie: await signIn(TRAVELLER) })).status).toBe(403)
    expect((await api('/api/trips/1/timetable', { cookie: await signIn(GUIDE) })).status).toBe(200)
    const org = await signIn(ORGANISER)
    expect((await api('/api/trips/1/timetable', { cookie: org })).status).toBe(200)
    await inviteAndChoosePassword(org, { name: 'Other Guide', email: 'other-guide@umbrafield.test', role: 'guide' }, 'other-guide-pw')
    const other = await signIn('other-guide@umbrafield.test', 'other-guide-pw')
    // A guide not on the trip is told so plainly, not that the trip is missing.
    const refused = await api('/api/trips/1/timetable', { cookie: other })
    expect(refused.status).toBe(403)
    expect(refused.body.data.code).toBe('not_assigned')
  })

  it('local times are UT plus the zone rules of the date: Madrid in summer time (+2 h) and Cairo (+3 h, east of Greenwich)', async () => {
    const org = await signIn(ORGANISER)
    // Trade facts: the EU keeps summer time (CEST, UTC+2) in August; Egypt restored summer time (UTC+3) in 2023 (from memory).
    const trip = await api('/api/trips', { method: 'POST', cookie: org, body: {
      workspaceId: 1, primarySiteId: 1, backupSiteIds: [4], title: 'Strait and Nile', startDate: '2027-07-31', endDate: '2027-08-03', seats: 5,
      priceMinor: 100, depositMinor: 10, currency: 'eur', balanceDueDate: '2027-05-01', guideIds: [2],
      meetingPoint: { name: 'Port', lat: 36.01, lon: -5.6, time: '2027-08-02T08:00:00+02:00' },
    } })
    const t = await api(`/api/trips/${trip.body.id}/timetable`, { cookie: org })
    const [tarifa, luxor] = t.body.sites
    expect(tarifa.zone).toBe('Europe/Madrid')
    expect(luxor.zone).toBe('Africa/Cairo')
    for (const k of ['c1', 'c2', 'max', 'c3', 'c4']) {
      expect(tarifa.contacts[k].local).toBe(shift(tarifa.contacts[k].utc, 2))
      expect(tarifa.contacts[k].utcOffset).toBe('+02:00')
      expect(luxor.contacts[k].local).toBe(shift(luxor.contacts[k].utc, 3))
    }
    // every cue is derived from its contact; filters off waits 2 σ after C2 (the cue rule)
    const off = tarifa.cues.find((c: { key: string }) => c.key === 'filters-off')
    expect(Date.parse(off.utc) - Date.parse(tarifa.contacts.c2.utc)).toBeCloseTo(2 * tarifa.contacts.c2.uncertaintySec * 1000, -2)
    const beads = tarifa.cues.find((c: { key: string }) => c.key === 'beads')
    expect(Date.parse(tarifa.contacts.c2.utc) - Date.parse(beads.utc)).toBeCloseTo(12_000, -2)
    expect(tarifa.contacts.c2.direction).toMatch(/o'clock/)
  })

  it('an annular eclipse never gets a "filters off" cue', async () => {
    const org = await signIn(ORGANISER)
    const ws = await api('/api/workspaces', { method: 'POST', body: { eclipseId: '2027-02-06', name: 'Annular test' }, cookie: org })
    const site = await api(`/api/workspaces/${ws.body.id}/sites`, { method: 'POST', body: { name: 'Mid-Atlantic', lat: -31.294, lon: -48.486 }, cookie: org })
    expect(site.body.metrics.type).toBe('annular')
    const trip = await api('/api/trips', { method: 'POST', cookie: org, body: {
      workspaceId: ws.body.id, primarySiteId: site.body.id, title: 'Ring of fire cruise', startDate: '2027-02-01', endDate: '2027-02-10', seats: 5,
      priceMinor: 100, depositMinor: 10, currency: 'usd', balanceDueDate: '2026-12-31', meetingPoint: { name: 'Ship', lat: -31.3, lon: -48.5, time: '2027-02-06T12:00:00Z' },
    } })
    const t = await api(`/api/trips/${trip.body.id}/timetable`, { cookie: org })
    const cues = t.body.sites[0].cues
    expect(cues.map((c: { key: string }) => c.key)).toContain('annularity')
    expect(cues.some((c: { filters: string }) => c.filters === 'off')).toBe(false)
    expect(JSON.stringify(cues)).not.toMatch(/filters off/i)
  })

  it('the PDF has a timetable page per site with its C2 time, each followed by that site\'s participants\' briefing', async () => {
    const cookie = await signIn(GUIDE)
    const t = await api('/api/trips/1/timetable', { cookie })
    const res = await fetch(url('/api/trips/1/timetable.pdf?paper=letter'), { headers: { cookie } })
    expect(res.headers.get('content-type')).toBe('application/pdf')
    const pages = await pdfText(await res.arrayBuffer())
    const timetablePages = pages.map((p, i) => ({ p, i })).filter(({ p }) => p.includes('CONTACT TIMETABLE'))
    const briefingPages = pages.map((p, i) => ({ p, i })).filter(({ p }) => p.includes('PARTICIPANTS\' BRIEFING'))
    expect(timetablePages).toHaveLength(t.body.sites.length)
    expect(briefingPages).toHaveLength(t.body.sites.length)
    t.body.sites.forEach((s: { name: string; contacts: { c2: { local: string } } }, k: number) => {
      const { p, i } = timetablePages[k]!
      expect(p).toContain(s.name)
      expect(p).toContain(s.contacts.c2.local.slice(11))
      expect(p).toContain('ISO 12312-2')
      // The briefing for the same site comes next, before the next site's timetable.
      const b = briefingPages[k]!
      expect(b.i).toBeGreaterThan(i)
      if (timetablePages[k + 1]) expect(b.i).toBeLessThan(timetablePages[k + 1]!.i)
      expect(b.p).toContain(`What you will see at ${s.name}`)
    })
  })

  it('cue offsets are stored per trip and never put "filters off" outside the safe window', async () => {
    const cookie = await signIn(GUIDE)
    const bad = await api('/api/trips/1/cues', { method: 'PUT', body: { offsets: { 'filters-off': -5 } }, cookie })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fields['offsets.filters-off']).toMatch(/outside the safe window at Luxor West Bank; allowed: C2 \+ \d+\.\d s to C2 \+ \d+\.\d s/)
    // The guide's edit that moves "chromosphere" twenty minutes on is refused, naming the cue and its range.
    const late = await api('/api/trips/1/cues', { method: 'PUT', body: { offsets: { chromosphere: 1200 } }, cookie })
    expect(late.status).toBe(400)
    expect(late.body.data.fields['offsets.chromosphere']).toMatch(/"chromosphere".*allowed: C2 \+/)
    // Guides cannot narrow (or touch) the margins; organisers may widen but not narrow them.
    expect((await api('/api/trips/1/cues', { method: 'PUT', body: { offsets: {}, margins: { sigmas: 3, endSec: 10 } }, cookie })).status).toBe(403)
    const org = await signIn(ORGANISER)
    const narrow = await api('/api/trips/1/cues', { method: 'PUT', body: { offsets: {}, margins: { sigmas: 1, endSec: 5 } }, cookie: org })
    expect(narrow.status).toBe(400)
    expect(narrow.body.data.fields['margins.sigmas']).toMatch(/never narrowed/)
    expect((await api('/api/trips/1/cues', { method: 'PUT', body: { offsets: { shadow: -90 } }, cookie })).status).toBe(200)
    const t = await api('/api/trips/1/timetable', { cookie })
    const s = t.body.sites[0]
    const shadow = s.cues.find((c: { key: string }) => c.key === 'shadow')
    expect(Date.parse(s.contacts.c2.utc) - Date.parse(shadow.utc)).toBeCloseTo(90_000, -2)
  })

  it('the ICS holds the contacts and cues with UTC start times', async () => {
    const cookie = await signIn(GUIDE)
    const t = await api('/api/trips/1/timetable', { cookie })
    const s = t.body.sites[0]
    const ics = await api(`/api/trips/1/sites/${s.siteId}/timetable.ics`, { cookie })
    expect(ics.headers.get('content-type')).toContain('text/calendar')
    const c2 = new Date(Math.round(Date.parse(s.contacts.c2.utc) / 1000) * 1000).toISOString().replace(/[-:]/g, '').slice(0, 15) + 'Z'
    expect(ics.body).toContain(`DTSTART:${c2}`)
    expect((ics.body.match(/BEGIN:VEVENT/g) ?? []).length).toBe(5 + s.cues.length)
    // Every event carries the one safety text and the time basis (ICS folds long lines: unfold first).
    const unfolded = ics.body.replace(/\r?\n[ \t]/g, '')
    const descriptions = unfolded.split(/\r?\n/).filter((l: string) => l.startsWith('DESCRIPTION:'))
    expect(descriptions).toHaveLength(5 + s.cues.length)
    for (const d of descriptions) {
      expect(d).toContain('ISO 12312-2')
      expect(d).toContain('Local rules and qualified advice come first.')
      expect(d).toContain('TT − UTC = 69.184 s')
    }
  })

  it('cues come sorted by time at every site', async () => {
    const t = await api('/api/trips/1/timetable', { cookie: await signIn(GUIDE) })
    for (const s of t.body.sites) {
      const times = s.cues.map((c: { utc: string }) => Date.parse(c.utc))
      expect(times).toEqual([...times].sort((a, b) => a - b))
    }
  })
})

describe('eye safety at the edge of the path and on annular trips', () => {
  it('a site with 4–10 s of totality near the north limit of 2027-08-02 gets no filters-off cue, and the timetable says why', async () => {
    const { computedElementsFor } = await import('../../server/eclipse/catalogue')
    const { localReport } = await import('../../server/eclipse/report')
    const { deltaTHourAngleRad, greatestT, offsetPoint } = await import('../../shared/eclipse')
    const el = computedElementsFor('2027-08-02')!
    const dH = deltaTHourAngleRad(el.deltaTSec)
    const tg = greatestT(el) - 0.02
    // Bisect across the northern limit for a point seeing about 7 s of totality.
    const at = (f: number) => offsetPoint(el, tg, f, 'umbra', dH)!
    const dur = (f: number) => localReport('2027-08-02', el, { latDeg: at(f).latDeg, lonDeg: at(f).lonDeg }, null).durationSec
    let lo = 0.99, hi = 1.0
    for (let i = 0; i < 40; i++) { const mid = (lo + hi) / 2; if (dur(mid) > 7) lo = mid; else hi = mid }
    const p = at(lo)
    const org = await signIn(ORGANISER)
    const site = await api('/api/workspaces/1/sites', { method: 'POST', body: { name: 'North-limit edge', lat: p.latDeg, lon: p.lonDeg, elevationM: 0 }, cookie: org })
    expect(site.status).toBe(201)
    expect(site.body.metrics.durationSec).toBeGreaterThanOrEqual(4)
    expect(site.body.metrics.durationSec).toBeLessThanOrEqual(10)
    const trip = await api('/api/trips', { method: 'POST', cookie: org, body: {
      workspaceId: 1, primarySiteId: 4, backupSiteIds: [site.body.id], title: 'Edge of the shadow', startDate: '2027-07-31', endDate: '2027-08-03', seats: 5,
      priceMinor: 100, depositMinor: 10, currency: 'eur', balanceDueDate: '2027-05-01', meetingPoint: { name: 'x', lat: 25.7, lon: 32.6, time: '2027-08-02T03:30:00Z' },
    } })
    const t = await api(`/api/trips/${trip.body.id}/timetable`, { cookie: org })
    const edge = t.body.sites[1]
    expect(edge.type).toBe('total')
    expect(edge.cues.some((c: { filters: string }) => c.filters === 'off')).toBe(false)
    expect(edge.notice).toBe('Totality here is too short to remove filters safely; keep them on.')
    expect(edge.filtersOffWindow).toBeNull()
    // The primary site still has its window and its filters-off cue.
    expect(t.body.sites[0].cues.some((c: { key: string }) => c.key === 'filters-off')).toBe(true)
    // The PDF says it too.
    const res = await fetch(url(`/api/trips/${trip.body.id}/timetable.pdf`), { headers: { cookie: org } })
    const pages = await pdfText(await res.arrayBuffer())
    const edgePages = pages.filter((p) => p.includes('North-limit edge'))
    // Its timetable page and its briefing both say so.
    expect(edgePages.filter((p) => p.includes('CONTACT TIMETABLE'))[0]).toContain('Totality here is too short to remove filters safely; keep them on.')
    expect(edgePages.filter((p) => p.includes('BRIEFING'))[0]).toContain('Totality here is too short to remove filters safely; keep them on.')
  })

  it('the demo annular trip says "annularity" on its page, timetable, PDF and calendar file, never "totality", and keeps filters on', async () => {
    const org = await signIn(ORGANISER)
    const list = await api('/api/trips', { cookie: org })
    const annular = list.body.data.find((x: { title: string }) => /Punta del Este/.test(x.title))
    expect(annular).toBeTruthy()
    const page = await api(`/api/trips/${annular.id}`)
    expect(page.body.eclipse.kind).toBe('annular')
    expect(page.body.eclipse.words.eclipseName).toBe('Annular solar eclipse')
    expect(page.body.eclipse.words.contact.c2).toBe('C2 — annularity begins')
    expect(JSON.stringify(page.body)).not.toMatch(/totality/i)
    const t = await api(`/api/trips/${annular.id}/timetable`, { cookie: await signIn(GUIDE) })
    expect(t.status).toBe(200)
    for (const s of t.body.sites) {
      expect(s.kind).toBe('annular')
      expect(s.cues.some((c: { filters: string }) => c.filters === 'off')).toBe(false)
      expect(s.safety.join(' ')).toMatch(/keep viewers and filters on throughout/)
    }
    expect(JSON.stringify(t.body.sites)).not.toMatch(/totality/i)
    const ics = await api(`/api/trips/${annular.id}/sites/${t.body.sites[0].siteId}/timetable.ics`, { cookie: org })
    expect(ics.body).toMatch(/annularity begins/)
    expect(ics.body).not.toMatch(/totality/i)
    const res = await fetch(url(`/api/trips/${annular.id}/timetable.pdf`), { headers: { cookie: org } })
    const pages = await pdfText(await res.arrayBuffer())
    expect(pages.join(' ')).toMatch(/annularity/)
    expect(pages.join(' ')).not.toMatch(/totality/i)
  })
})
