import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs'
import { describe, expect, it } from 'vitest'
import { url } from '@nuxt/test-utils/e2e'
import { api, GUIDE, ORGANISER, signIn, TRAVELLER, useApp } from './app'

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
    const inv = await api('/api/users', { method: 'POST', body: { name: 'Other Guide', email: 'other-guide@umbrafield.test', role: 'guide' }, cookie: org })
    const other = await signIn('other-guide@umbrafield.test', inv.body.temporaryPassword)
    expect((await api('/api/trips/1/timetable', { cookie: other })).status).toBe(404)
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
    // every cue is derived from its contact
    const off = tarifa.cues.find((c: { key: string }) => c.key === 'filters-off')
    expect(off.utc.slice(0, 21)).toBe(tarifa.contacts.c2.utc.slice(0, 21))
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

  it('the PDF has one page per site and contains each C2 time', async () => {
    const cookie = await signIn(GUIDE)
    const t = await api('/api/trips/1/timetable', { cookie })
    const res = await fetch(url('/api/trips/1/timetable.pdf?paper=letter'), { headers: { cookie } })
    expect(res.headers.get('content-type')).toBe('application/pdf')
    const pages = await pdfText(await res.arrayBuffer())
    expect(pages).toHaveLength(t.body.sites.length)
    t.body.sites.forEach((s: { name: string; contacts: { c2: { local: string } } }, i: number) => {
      expect(pages[i]).toContain(s.name)
      expect(pages[i]).toContain(s.contacts.c2.local.slice(11))
      expect(pages[i]).toContain('ISO 12312-2')
    })
  })

  it('cue offsets are stored per trip and never put "filters off" before C2', async () => {
    const cookie = await signIn(GUIDE)
    const bad = await api('/api/trips/1/cues', { method: 'PUT', body: { offsets: { 'filters-off': -5 } }, cookie })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fields['offsets.filters-off']).toMatch(/before C2/)
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
  })
})
