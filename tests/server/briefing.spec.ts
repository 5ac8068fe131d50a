import { describe, expect, it } from 'vitest'
import { api, GUIDE, ORGANISER, signIn, TRAVELLER, TRAVELLER2, useApp } from './app'

// The participants' briefing. Demo: traveller2 holds a confirmed booking on the Luxor trip (1);
// traveller has none there.
await useApp()

describe('participants\' briefing', () => {
  it('a booked traveller reads the Luxor West Bank briefing; a traveller without a booking gets a 404', async () => {
    const booked = await api('/api/trips/1/briefing', { cookie: await signIn(TRAVELLER2) })
    expect(booked.status).toBe(200)
    expect(booked.body.site.name).toBe('Luxor West Bank')
    expect(booked.body.kind).toBe('total')
    const keys = booked.body.steps.map((s: { key: string }) => s.key)
    for (const k of ['partial-begins', 'shadow', 'beads', 'filters-off', 'corona', 'filters-on', 'c3', 'partial-ends']) expect(keys).toContain(k)
    // Filters-off steps sit inside the timetable's own window for the site.
    const t = await api('/api/trips/1/timetable', { cookie: await signIn(GUIDE) })
    const w = t.body.sites[0].filtersOffWindow
    for (const s of booked.body.steps.filter((x: { filters: string }) => x.filters === 'off')) {
      expect(Date.parse(s.utc)).toBeGreaterThanOrEqual(Date.parse(w.startUtc))
      expect(Date.parse(s.utc)).toBeLessThanOrEqual(Date.parse(w.endUtc))
    }
    expect(booked.body.sky.sun.map((s: { contact: string }) => s.contact)).toEqual(['c1', 'c2', 'max', 'c3', 'c4'])
    expect(booked.body.corona.phase).toBe('declining')
    expect(booked.body.safety.join(' ')).toMatch(/ISO 12312-2/)
    expect(booked.body.weather.words).toMatch(/clear about \d+ times in 100|No cloud history/)
    expect((await api('/api/trips/1/briefing', { cookie: await signIn(TRAVELLER) })).status).toBe(404)
    expect((await api('/api/trips/1/briefing')).status).toBe(401)
    expect((await api('/api/trips/999/briefing', { cookie: await signIn(ORGANISER) })).status).toBe(404)
  })

  it('backup sites have their own briefing; a site of another trip is a 404; a bad site number a 400 naming it', async () => {
    const cookie = await signIn(GUIDE)
    const t = await api('/api/trips/1/timetable', { cookie })
    const backup = t.body.sites[1]
    const b = await api(`/api/trips/1/briefing?siteId=${backup.siteId}`, { cookie })
    expect(b.status).toBe(200)
    expect(b.body.site.name).toBe(backup.name)
    expect((await api('/api/trips/1/briefing?siteId=9999', { cookie })).status).toBe(404)
    const bad = await api('/api/trips/1/briefing?siteId=x', { cookie })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.data.fields)).toContain('siteId')
  })

  it('the organiser edits what to bring; travellers cannot; bad lists are refused whole with the field', async () => {
    const org = await signIn(ORGANISER)
    const items = ['ISO 12312-2 viewers', 'Red torch', 'Folding chair']
    expect((await api('/api/trips/1/checklist', { method: 'PUT', body: { items }, cookie: org })).status).toBe(200)
    expect((await api('/api/trips/1/briefing', { cookie: await signIn(TRAVELLER2) })).body.checklist).toEqual(items)
    expect((await api('/api/trips/1/checklist', { method: 'PUT', body: { items: ['x'] }, cookie: await signIn(TRAVELLER2) })).status).toBe(403)
    const empty = await api('/api/trips/1/checklist', { method: 'PUT', body: { items: [] }, cookie: org })
    expect(empty.status).toBe(400)
    expect(Object.keys(empty.body.data.fields).join()).toMatch(/items/)
    const blank = await api('/api/trips/1/checklist', { method: 'PUT', body: { items: ['ok', ''] }, cookie: org })
    expect(blank.status).toBe(400)
    expect((await api('/api/trips/1/briefing', { cookie: org })).body.checklist).toEqual(items)
  })

  it('the annular trip\'s briefing keeps filters on throughout and never says "totality"', async () => {
    const org = await signIn(ORGANISER)
    const b = await api('/api/trips/2/briefing', { cookie: org })
    expect(b.status).toBe(200)
    expect(b.body.kind).toBe('annular')
    expect(b.body.steps.every((s: { filters: string }) => s.filters === 'on')).toBe(true)
    expect(JSON.stringify(b.body.steps)).not.toMatch(/totality/i)
    expect(b.body.corona).toBeNull()
  })
})
