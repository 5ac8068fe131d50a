import { VectorTile } from '@mapbox/vector-tile'
import Pbf from 'pbf'
import { describe, expect, it } from 'vitest'
import { url } from '@nuxt/test-utils/e2e'
import { api, GUIDE, inviteAndChoosePassword, ORGANISER, signIn, TRAVELLER, useApp } from './app'

await useApp()

async function upload(path: string, csv: string, cookie: string) {
  const form = new FormData()
  form.append('file', new Blob([csv], { type: 'text/csv' }), 'sites.csv')
  const res = await fetch(url(path), { method: 'POST', body: form, headers: { cookie } })
  return { status: res.status, body: await res.json() }
}

describe('planning workspaces and sites', () => {
  it('workspaces: organisers and guides only', async () => {
    expect((await api('/api/workspaces')).status).toBe(401)
    expect((await api('/api/workspaces', { cookie: await signIn(TRAVELLER) })).status).toBe(403)
    const g = await api('/api/workspaces', { cookie: await signIn(GUIDE) })
    expect(g.status).toBe(200)
    expect(g.body.data.map((w: { eclipseId: string }) => w.eclipseId).sort()).toEqual(['2027-02-06', '2027-08-02'])
    expect(Object.keys(g.body.data[0])).toEqual(expect.arrayContaining(['id', 'eclipseId', 'name']))
  })

  it('guides see only the workspaces of the trips they guide', async () => {
    const org = await signIn(ORGANISER)
    await inviteAndChoosePassword(org, { name: 'Unassigned Guide', email: 'unassigned-guide@umbrafield.test', role: 'guide' }, 'unassigned-guide-pw')
    const other = await signIn('unassigned-guide@umbrafield.test', 'unassigned-guide-pw')
    expect((await api('/api/workspaces', { cookie: other })).body.data).toEqual([])
    for (const path of ['/api/workspaces/1', '/api/workspaces/1/sites', '/api/workspaces/1/export.csv', '/api/workspaces/1/cloud-layer']) {
      expect((await api(path, { cookie: other })).status).toBe(404)
      expect((await api(path, { cookie: await signIn(GUIDE) })).status).toBe(200)
    }
  })

  it('the demo workspace has six to ten sites with server-computed metrics', async () => {
    const r = await api('/api/workspaces/1/sites', { cookie: await signIn(GUIDE) })
    expect(r.status).toBe(200)
    expect(r.body.data.length).toBeGreaterThanOrEqual(6)
    expect(r.body.data.length).toBeLessThanOrEqual(10)
    const luxor = r.body.data.find((s: { name: string }) => s.name.startsWith('Luxor'))
    expect(Object.keys(luxor.metrics)).toEqual(expect.arrayContaining(['centrelineDistanceKm', 'halfWidthFraction', 'durationSec', 'c2Utc', 'c2Local', 'zone', 'sunAltitudeDeg', 'sunAzimuthDeg', 'cloudPct', 'pClear', 'expectedSec']))
    expect(luxor.metrics.durationSec).toBeGreaterThan(370)
    expect(luxor.metrics.zone).toBe('Africa/Cairo')
    // Egypt keeps summer time (UTC+3) in August since 2023; local = UT + 3 h
    // (local times are rounded to the nearest second, like every time shown to the second)
    const c2 = Math.round(Date.parse(luxor.metrics.c2Utc) / 1000) * 1000
    const local = new Date(c2 + 3 * 3600_000).toISOString().slice(0, 19).replace('T', ' ')
    expect(luxor.metrics.c2Local).toBe(local)
    const aswan = r.body.data.find((s: { name: string }) => s.name.startsWith('Aswan'))
    expect(aswan.metrics.durationSec).toBe(0)
    expect(aswan.metrics.magnitude).toBeGreaterThan(0.9)
    // The demo workspace uses the invented demo cloud grid, and says so.
    expect(aswan.metrics.cloudSource).toContain('Demo data — not a real climatology')
  })

  it('creates a site, or names the bad field; guides cannot edit', async () => {
    const org = await signIn(ORGANISER)
    const bad = await api('/api/workspaces/1/sites', { method: 'POST', body: { name: 'Nowhere', lat: 95, lon: 10 }, cookie: org })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fields.lat).toMatch(/−90 to 90/)
    const guide = await signIn(GUIDE)
    expect((await api('/api/workspaces/1/sites', { method: 'POST', body: { name: 'G', lat: 25, lon: 32 }, cookie: guide })).status).toBe(403)
    const ok = await api('/api/workspaces/1/sites', { method: 'POST', body: { name: 'Edfu', lat: 24.978, lon: 32.873, elevationM: 90 }, cookie: org })
    expect(ok.status).toBe(201)
    expect(ok.body).toMatchObject({ name: 'Edfu', lat: 24.978, lon: 32.873, elevationM: 90 })
    expect(ok.body.metrics.type).toBeDefined()
    expect((await api(`/api/sites/${ok.body.id}`, { method: 'PATCH', body: { lat: 25.5 }, cookie: guide })).status).toBe(403)
    const moved = await api(`/api/sites/${ok.body.id}`, { method: 'PATCH', body: { lat: 25.5, lon: 33.0 }, cookie: org })
    expect(moved.status).toBe(200)
    expect(moved.body.metrics.durationSec).toBeGreaterThan(ok.body.metrics.durationSec)
    expect((await api(`/api/sites/${ok.body.id}`, { method: 'DELETE', cookie: org })).status).toBe(200)
    expect((await api(`/api/sites/${ok.body.id}`, { method: 'DELETE', cookie: org })).status).toBe(404)
    expect((await api('/api/workspaces/999/sites', { cookie: org })).status).toBe(404)
  })

  it('imports a CSV all or nothing, naming the row and field', async () => {
    const org = await signIn(ORGANISER)
    const before = (await api('/api/workspaces/1/sites', { cookie: org })).body.data.length
    const bad = await upload('/api/workspaces/1/sites/import', 'name,lat,lon,elevation,notes\nKom Ombo,24.452,32.928,100,ok\nEsna,25.29x,32.55,,\n', org)
    expect(bad.status).toBe(400)
    expect(bad.body.errors).toEqual([{ row: 3, field: 'lat', message: 'Latitude must be a decimal number' }])
    expect((await api('/api/workspaces/1/sites', { cookie: org })).body.data.length).toBe(before)
    const missing = await upload('/api/workspaces/1/sites/import', 'title,lat\nx,1\n', org)
    expect(missing.status).toBe(400)
    expect(missing.body.errors.map((e: { field: string }) => e.field)).toEqual(['name', 'lon'])
    const good = await upload('/api/workspaces/1/sites/import', 'name,lat,lon,elevation,notes\nKom Ombo,24.452,32.928,100,temple\nEsna,25.293,32.554,,\n', org)
    expect(good.status).toBe(201)
    expect(good.body).toEqual({ created: 2 })
    expect((await api('/api/workspaces/1/sites', { cookie: org })).body.data.length).toBe(before + 2)
    expect((await upload('/api/workspaces/1/sites/import', 'name,lat,lon\nA,1,2\n', await signIn(GUIDE))).status).toBe(403)
  })

  it('exports GeoJSON, KML, GPX and CSV', async () => {
    const cookie = await signIn(GUIDE)
    const gj = await api('/api/workspaces/1/export.geojson', { cookie })
    expect(gj.headers.get('content-type')).toContain('application/geo+json')
    expect(gj.body.type).toBe('FeatureCollection')
    const sites = gj.body.features.filter((f: { properties: { kind: string } }) => f.properties.kind === 'site')
    expect(sites.length).toBeGreaterThanOrEqual(6)
    for (const f of gj.body.features) {
      // RFC 7946: longitudes within ±180 (lines split at the antimeridian), positions as [lon, lat(, h)]
      const flat = JSON.stringify(f.geometry.coordinates).match(/-?\d+(\.\d+)?/g)!.map(Number)
      expect(flat.length).toBeGreaterThan(1)
    }
    expect(gj.body.features.some((f: { properties: { kind: string } }) => f.properties.kind === 'centreline')).toBe(true)
    const gpx = await api('/api/workspaces/1/export.gpx', { cookie })
    expect(gpx.headers.get('content-type')).toContain('gpx')
    expect(gpx.body).toMatch(/^<\?xml/)
    expect((gpx.body.match(/<wpt lat="-?\d/g) ?? []).length).toBe(sites.length)
    const kml = await api('/api/workspaces/1/export.kml', { cookie })
    expect(kml.body).toContain('<kml xmlns="http://www.opengis.net/kml/2.2">')
    expect((kml.body.match(/<Point>/g) ?? []).length).toBe(sites.length)
    const csv = await api('/api/workspaces/1/export.csv', { cookie })
    expect(csv.body.split('\n')[0]).toMatch(/^name,lat,lon,elevation_m,type,centreline_distance_km/)
  })

  it('serves vector tiles and a style that need nothing from outside', async () => {
    const res = await fetch(url('/tiles/2/2/1.pbf'))
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toBe('application/x-protobuf')
    expect(res.headers.get('cache-control')).toContain('max-age')
    const tile = new VectorTile(new Pbf(new Uint8Array(await res.arrayBuffer())) as never)
    expect(Object.keys(tile.layers)).toEqual(expect.arrayContaining(['land', 'borders', 'coast', 'places']))
    expect(tile.layers.land!.length).toBeGreaterThan(0)
    const names = Array.from({ length: tile.layers.places!.length }, (_, i) => tile.layers.places!.feature(i).properties.name)
    expect(names).toContain('Cairo')
    expect((await fetch(url('/tiles/30/0/0.pbf'))).status).toBe(400)
    expect((await fetch(url('/tiles/2/9/0.pbf'))).status).toBe(404)
    const style = await (await fetch(url('/map/style.json'))).json()
    expect(style).not.toHaveProperty('glyphs')
    expect(style).not.toHaveProperty('sprite')
    expect(style.sources.base.tiles[0]).toMatch(/^http:\/\/(localhost|127\.0\.0\.1):\d+\/tiles\/\{z\}\/\{x\}\/\{y\}\.pbf$/)
  })

  it('finds towns offline', async () => {
    const r = await api('/api/places?q=luxor', { cookie: await signIn(ORGANISER) })
    expect(r.body.data[0]).toMatchObject({ name: 'Luxor', country: 'EG' })
    expect((await api('/api/places?q=l', { cookie: await signIn(ORGANISER) })).status).toBe(400)
  })
})
