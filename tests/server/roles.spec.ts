import { readdirSync, statSync } from 'node:fs'
import { join, relative, resolve } from 'node:path'
import { beforeAll, describe, expect, it } from 'vitest'
import { api, GUIDE, inviteAndChoosePassword, ORGANISER, signIn, TRAVELLER, useApp } from './app'

await useApp()

/**
 * Who may call what: every route under server/api, for each kind of caller. "public" routes answer
 * anyone; "user" routes any signed-in person (scoped to their own rows: someone else's is a 404);
 * "staff" routes organisers and the guides assigned to the trip or workspace (another guide gets a
 * 404, a traveller a 403); "booked" routes organisers, the trip's guides and travellers booked on the trip
 * (the demo traveller has no booking on trip 1: a 404, as for anyone else outside it); "guides" routes
 * organisers and every guide; "organiser" routes organisers only.
 * Denied means 401 signed out, 403 for a role that never may, 404 for a row outside the caller's reach.
 */
type Access = 'public' | 'user' | 'staff' | 'booked' | 'guides' | 'organiser'
const ROUTES: Array<[string, string, Access]> = [
  ['POST', '/api/auth/confirmation', 'user'],
  ['POST', '/api/auth/login', 'public'],
  ['POST', '/api/auth/logout', 'public'],
  ['POST', '/api/auth/register', 'public'],
  ['POST', '/api/auth/sign-out-everywhere', 'user'],
  ['POST', '/api/auth/verify-email', 'public'],
  ['PATCH', '/api/bookings/1', 'user'],
  ['POST', '/api/bookings/1/cancel', 'user'],
  ['POST', '/api/bookings/1/checkout', 'user'],
  ['GET', '/api/bookings/1', 'user'],
  ['POST', '/api/bookings/1/refund', 'organiser'],
  ['GET', '/api/bookings', 'user'],
  ['GET', '/api/climatology', 'guides'],
  ['POST', '/api/climatology', 'organiser'],
  ['DELETE', '/api/eclipses/2027-08-02/elements', 'organiser'],
  ['PUT', '/api/eclipses/2027-08-02/elements', 'organiser'],
  ['GET', '/api/eclipses/2027-08-02', 'public'],
  ['GET', '/api/eclipses/2027-08-02/local?lat=25.7&lon=32.6', 'public'],
  ['GET', '/api/eclipses/2027-08-02/path?step=600', 'public'],
  ['PATCH', '/api/eclipses/2027-08-02/settings', 'organiser'],
  ['GET', '/api/eclipses', 'public'],
  ['GET', '/api/health', 'public'],
  ['GET', '/api/me', 'user'],
  ['PATCH', '/api/me', 'user'],
  ['POST', '/api/outbox/1/retry', 'organiser'],
  ['GET', '/api/outbox', 'organiser'],
  ['GET', '/api/places?q=Luxor', 'guides'],
  ['GET', '/api/reconciliation', 'organiser'],
  ['POST', '/api/reconciliation/run', 'organiser'],
  ['DELETE', '/api/sites/1', 'organiser'],
  ['PATCH', '/api/sites/2', 'organiser'],
  ['POST', '/api/stripe/webhook', 'public'],
  ['GET', '/api/trips/1/briefing', 'booked'],
  ['PUT', '/api/trips/1/checklist', 'organiser'],
  ['GET', '/api/trips/1/bookings.csv', 'organiser'],
  ['GET', '/api/trips/1/bookings', 'organiser'],
  ['POST', '/api/trips/1/bookings', 'user'],
  ['PUT', '/api/trips/1/cues', 'staff'],
  ['GET', '/api/trips/1', 'public'],
  ['GET', '/api/trips/1/itinerary', 'organiser'],
  ['POST', '/api/trips/1/itinerary', 'organiser'],
  ['GET', '/api/trips/1/participants', 'staff'],
  ['POST', '/api/trips/1/publish', 'organiser'],
  ['GET', '/api/trips/1/sites/4/timetable.ics', 'staff'],
  ['GET', '/api/trips/1/timetable', 'staff'],
  ['GET', '/api/trips/1/timetable.pdf', 'staff'],
  ['POST', '/api/trips/1/waitlist', 'user'],
  ['GET', '/api/trips', 'public'],
  ['POST', '/api/trips', 'organiser'],
  ['PATCH', '/api/users/3', 'organiser'],
  ['GET', '/api/users', 'organiser'],
  ['POST', '/api/users', 'organiser'],
  ['GET', '/api/workspaces/1/cloud-layer', 'staff'],
  ['GET', '/api/workspaces/1/expected-seen', 'staff'],
  ['GET', '/api/workspaces/1/expected-seen/point?lat=25.7&lon=32.6', 'staff'],
  ['GET', '/api/workspaces/1/best-spots?lat=25.7&lon=32.6&radiusKm=20&limit=2', 'staff'],
  ['GET', '/api/workspaces/1/terrain', 'staff'],
  ['POST', '/api/workspaces/1/terrain', 'organiser'],
  ['GET', '/api/workspaces/1/export.csv', 'staff'],
  ['GET', '/api/workspaces/1/export.geojson', 'staff'],
  ['GET', '/api/workspaces/1/export.gpx', 'staff'],
  ['GET', '/api/workspaces/1/export.kml', 'staff'],
  ['GET', '/api/workspaces/1', 'staff'],
  ['PATCH', '/api/workspaces/1', 'organiser'],
  ['POST', '/api/workspaces/1/sites/import', 'organiser'],
  ['GET', '/api/workspaces/1/sites', 'staff'],
  ['POST', '/api/workspaces/1/sites', 'organiser'],
  ['GET', '/api/workspaces', 'guides'],
  ['POST', '/api/workspaces', 'organiser'],
]

type Caller = 'signed out' | 'traveller' | 'guide (assigned)' | 'guide (not assigned)' | 'organiser'
const CALLERS: Caller[] = ['signed out', 'traveller', 'guide (assigned)', 'guide (not assigned)', 'organiser']

/** The statuses each caller must (or must not) get. */
function expected(access: Access, caller: Caller): 'allowed' | 401 | 403 | 404 {
  if (access === 'public') return 'allowed'
  if (caller === 'signed out') return 401
  if (access === 'user' || caller === 'organiser') return 'allowed'
  if (access === 'booked') return caller === 'guide (assigned)' ? 'allowed' : 404
  if (caller === 'traveller') return 403
  if (access === 'guides') return 'allowed'
  if (access === 'staff') return caller === 'guide (assigned)' ? 'allowed' : 404
  return 403
}

function routeFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f)
    return statSync(p).isDirectory() ? routeFiles(p) : [p]
  })
}

const cookies = new Map<Caller, string>()
beforeAll(async () => {
  const org = await signIn(ORGANISER)
  await inviteAndChoosePassword(org, { name: 'Roles Other Guide', email: 'roles-other-guide@umbrafield.test', role: 'guide' }, 'roles-other-guide-pw')
  cookies.set('signed out', '')
  cookies.set('traveller', await signIn(TRAVELLER))
  cookies.set('guide (assigned)', await signIn(GUIDE))
  cookies.set('guide (not assigned)', await signIn('roles-other-guide@umbrafield.test', 'roles-other-guide-pw'))
  cookies.set('organiser', org)
})

describe('the role matrix', () => {
  it('lists every route under server/api', () => {
    const root = resolve(__dirname, '../../server/api')
    const files = routeFiles(root).map((f) => relative(root, f))
    const norm = (method: string, path: string) => `${method} ${path.split('?')[0]!.replace(/^\/api\//, '').replace(/\/\d+(?=\/|$)/g, '/[id]').replace(/2027-08-02/, '[id]')}`
    const listed = new Set(ROUTES.map(([m, p]) => norm(m, p)))
    const fromFiles = files.map((f) => {
      const m = /^(.*?)(?:\/index)?\.(get|post|put|patch|delete)\.ts$/.exec(f)!
      return `${m[2]!.toUpperCase()} ${m[1]!.replace(/\[siteId\]/, '[id]')}`
    })
    expect(fromFiles.filter((r) => !listed.has(r))).toEqual([])
  })

  // Session-ending routes are called last, with a fresh sign-in, so they do not end the callers' sessions.
  const SESSION_ENDING = new Set(['/api/auth/logout', '/api/auth/sign-out-everywhere'])
  const UPLOADS = new Set(['/api/climatology', '/api/workspaces/1/sites/import', '/api/workspaces/1/terrain'])
  const ordered = [...ROUTES.filter(([, p]) => !SESSION_ENDING.has(p)), ...ROUTES.filter(([, p]) => SESSION_ENDING.has(p))]
  it.each(ordered)('%s %s (%s)', async (method, path, access) => {
    const seen: string[] = []
    for (const caller of CALLERS) {
      let cookie = cookies.get(caller)!
      if (SESSION_ENDING.has(path) && caller !== 'signed out') {
        const email = { traveller: TRAVELLER, 'guide (assigned)': GUIDE, organiser: ORGANISER }[caller as 'traveller']
        if (!email) continue
        cookie = await signIn(email)
      }
      // Upload routes take multipart only: they are called without a body, so the role decides.
      const bodyless = method === 'GET' || method === 'DELETE' || UPLOADS.has(path)
      const r = await api(path, { method, cookie: cookie || undefined, ...(bodyless ? {} : { body: {} }) })
      const want = expected(access, caller)
      const ok = want === 'allowed' ? ![401, 403].includes(r.status) : r.status === want
      if (!ok) seen.push(`${caller}: got ${r.status}, want ${want}`)
    }
    expect(seen).toEqual([])
  })
})
