import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { describe, expect, it } from 'vitest'
import { parseCanonCsv } from '../../server/eclipse/canonCsv'
import { api, GUIDE, ORGANISER, signIn, useApp } from './app'

await useApp()

// Source for the published set: Five Millennium Canon (Espenak & Meeus, NASA/TP-2006-214141).
const canon = parseCanonCsv(readFileSync(resolve(__dirname, '../fixtures/reference/canon-besselian-1900-2100.csv'), 'utf8'))
const canon2027 = canon.find((s) => s.date === '2027-08-02')!
const { kind: _k, ...published2027 } = { ...canon2027, source: 'Five Millennium Canon, Espenak & Meeus (NASA/TP-2006-214141)' }

describe('eclipse catalogue and engine over HTTP', () => {
  it('lists 454 eclipses 1900–2100 and filters by type and year', async () => {
    const all = await api('/api/eclipses')
    expect(all.status).toBe(200)
    expect(all.body.data.length).toBe(454)
    const totals2027 = await api('/api/eclipses?from=2027&to=2027&type=total')
    expect(totals2027.body.data.map((e: { id: string }) => e.id)).toEqual(['2027-08-02'])
  })

  it('bad input names the field', async () => {
    const r = await api('/api/eclipses/2027-08-02/local?lat=91&lon=abc')
    expect(r.status).toBe(400)
    expect(Object.keys(r.body.data.fields).sort()).toEqual(['lat', 'lon'])
    const unknown = await api('/api/eclipses/2027-08-03/local?lat=1&lon=1')
    expect(unknown.status).toBe(400)
    expect(unknown.body.message).toMatch(/No solar eclipse/)
  })

  it('local circumstances state their time basis, ΔT and element source', async () => {
    const r = await api('/api/eclipses/2027-08-02/local?lat=25.6872&lon=32.6396') // Luxor
    expect(r.status).toBe(200)
    expect(r.body.type).toBe('total')
    expect(r.body.durationSec).toBeGreaterThan(300)
    expect(r.body.elementsKind).toBe('computed')
    expect(typeof r.body.deltaTSec).toBe('number')
    expect(r.body.c2.utc).toMatch(/^2027-08-02T\d\d:\d\d:\d\d\.\dZ$/)
    // C2 carries at least the ±2 s of the lunar limb profile.
    expect(r.body.uncertaintySec.c2).toBeGreaterThanOrEqual(2)
    // Clock times are UTC: TT − UTC = 32.184 + 37 s (IERS Bulletin C); ΔT is the model's prediction.
    expect(r.body.time.clock).toBe('UTC')
    expect(r.body.time.ttMinusUtcSec).toBeCloseTo(69.184, 6)
    expect(Math.abs(r.body.time.deltaTSec - 69.2)).toBeLessThanOrEqual(1)
    expect(r.body.time.ut1MinusUtcSec).toBeCloseTo(69.184 - r.body.time.deltaTSec, 1)
    expect(r.body.time.line).toMatch(/Times are UTC\. TT − UTC = 69\.184 s/)
  })

  it('a published set wins, and with the publisher\'s ΔT reproduces the Canon\'s greatest eclipse', async () => {
    const guide = await signIn(GUIDE)
    expect((await api('/api/eclipses/2027-08-02/elements', { method: 'PUT', body: published2027, cookie: guide })).status).toBe(403)
    const org = await signIn(ORGANISER)
    const bad = await api('/api/eclipses/2027-08-02/elements', { method: 'PUT', body: { ...published2027, mu: [1, 2] }, cookie: org })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fields.mu).toMatch(/3 coefficients/)
    const ok = await api('/api/eclipses/2027-08-02/elements', { method: 'PUT', body: published2027, cookie: org })
    expect(ok.status).toBe(200)
    const detail = await api('/api/eclipses/2027-08-02')
    expect(detail.body.elements.kind).toBe('published')
    // The publisher's ΔT is reported; the default stays the model's, so clock times stay right.
    expect(detail.body.time.publisherDeltaTSec).toBe(76)
    expect(detail.body.deltaT.basis).not.toBe('override')
    // With the publisher's ΔT as the override the Canon's figures come back. Canon: greatest eclipse
    // 10:07:50 TD (10:06:34 UT with ΔT 76.0 s), 25.5° N 33.2° E, 6m23s, 257.7 km. In UTC that
    // instant is 10:07:50 − 69.184 s (TT − UTC), whatever ΔT is.
    await api('/api/eclipses/2027-08-02/settings', { method: 'PATCH', body: { deltaTSec: 76 }, cookie: org })
    const asPublished = await api('/api/eclipses/2027-08-02')
    expect(asPublished.body.deltaT.sec).toBe(76)
    const wantUtcMs = Date.parse('2027-08-02T10:07:50Z') - 69_184
    expect(Math.abs(Date.parse(asPublished.body.greatest.utc) - wantUtcMs)).toBeLessThanOrEqual(1000)
    expect(Math.abs(asPublished.body.greatest.lat - 25.5)).toBeLessThanOrEqual(0.05)
    expect(Math.abs(asPublished.body.greatest.lon - 33.2)).toBeLessThanOrEqual(0.05)
    expect(Math.abs(asPublished.body.centralDurationSec - 383)).toBeLessThanOrEqual(1)
    expect(Math.abs(asPublished.body.pathWidthKm - 257.7)).toBeLessThan(1)
    await api('/api/eclipses/2027-08-02/settings', { method: 'PATCH', body: { deltaTSec: null }, cookie: org })
    const local = await api('/api/eclipses/2027-08-02/local?lat=25.5&lon=33.2')
    expect(local.body.elementsKind).toBe('published')
    expect(local.body.elementsSource).toMatch(/Canon/)
  })

  it('a ΔT override moves UT by the same amount as the publisher\'s method', async () => {
    const org = await signIn(ORGANISER)
    const before = await api('/api/eclipses/2027-08-02/local?lat=25.5&lon=33.2')
    const perRequest = await api('/api/eclipses/2027-08-02/local?lat=25.5&lon=33.2&deltaT=70')
    expect(perRequest.body.deltaTSec).toBe(70)
    expect(perRequest.body.deltaTBasis).toBe('override')
    await api('/api/eclipses/2027-08-02/settings', { method: 'PATCH', body: { deltaTSec: 70 }, cookie: org })
    const perEclipse = await api('/api/eclipses/2027-08-02/local?lat=25.5&lon=33.2')
    expect(perEclipse.body.c2.utc).toBe(perRequest.body.c2.utc)
    expect(perEclipse.body.c2.utc).not.toBe(before.body.c2.utc)
    await api('/api/eclipses/2027-08-02/settings', { method: 'PATCH', body: { deltaTSec: null }, cookie: org })
    await api('/api/eclipses/2027-08-02/elements', { method: 'DELETE', cookie: org })
    expect((await api('/api/eclipses/2027-08-02')).body.elements.kind).toBe('computed')
  })

  it('the path is GeoJSON with ticks on the centre and limits', async () => {
    const r = await api('/api/eclipses/2027-08-02/path?step=300')
    expect(r.body.type).toBe('FeatureCollection')
    const kinds = new Set(r.body.features.map((f: { properties: { kind: string } }) => f.properties.kind))
    for (const k of ['centreline', 'limit', 'penumbral-limit', 'path-end', 'duration', 'tick']) expect(kinds).toContain(k)
    const tick = r.body.features.find((f: { properties: { kind: string; line: string } }) => f.properties.kind === 'tick' && f.properties.line === 'centre')
    expect(tick.properties.utc).toMatch(/:(00|05|10|15|20|25|30|35|40|45|50|55):00\.0Z$/)
    expect(tick.properties.pathWidthKm).toBeGreaterThan(100)
  })
})
