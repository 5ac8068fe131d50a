import { readdirSync, statSync } from 'node:fs'
import { join, relative, resolve } from 'node:path'
import { url } from '@nuxt/test-utils/e2e'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/database/connection'
import { DEMO_TRIP_TITLE, DEMO_WORKSPACE } from '../../server/database/seed/demo'
import { api, GUIDE, inviteAndChoosePassword, ORGANISER, signIn, TRAVELLER, TRAVELLER2, until, useApp } from './app'

const { dbTarget } = await useApp()
const db = openDatabase(dbTarget)
afterAll(() => db.destroy())

/**
 * Who may call what: every route under server/api, for every kind of caller, with the exact status
 * each must get. Allowed callers get the route's success (200/201/202) or, where the row sends an
 * empty or invalid body on purpose, the exact 400 that body earns. Denied callers get 401 signed out,
 * 403 for a role that never may, 404 for a row outside the caller's reach. Nothing may answer 500.
 *
 * Callers, in the order each row calls them (the organiser last, so a row's destructive call comes
 * after everyone else's):
 *   anon     signed out
 *   trav     traveller@ — a traveller with no booking on any trip
 *   booked   traveller2@ — holds the demo's confirmed booking on the Luxor trip
 *   guide    guide@ — assigned to the demo trips (so to the demo workspaces)
 *   other    a guide invited here, assigned to nothing
 *   org      organiser@
 */
const CALLERS = ['anon', 'trav', 'booked', 'guide', 'other', 'org'] as const
type Caller = (typeof CALLERS)[number]
type Want = readonly [anon: number, trav: number, booked: number, guide: number, other: number, org: number]

/** Fixtures made in beforeAll; rows read them when they run. */
const fx = {
  cookies: new Map<Caller, string>(),
  passwords: new Map<Caller, string>(),
  emails: new Map<Caller, string>(),
  /** The demo's Luxor trip, its workspace and primary site, and the booked traveller's booking on it. */
  luxorTrip: 0, luxorWs: 0, luxorSite: 0, luxorBooking: 0,
  /** A published trip on which the booked traveller keeps an active hold (the hold-changing rows use it). */
  ownTrip: 0,
  /** A published trip with room: every signed-in caller may hold a seat on it. */
  openTrip: 0,
  /** A published trip whose one seat a filler account holds: every signed-in caller may join its waitlist. */
  fullTrip: 0,
  /** A site used by no trip, made for the delete row. */
  spareSite: 0,
  /** The unassigned guide's user id (the role-change row sets it to the role it already has). */
  otherId: 0,
  outboxId: 0,
}

const tripBody = (over: Record<string, unknown> = {}) => ({
  workspaceId: fx.luxorWs, primarySiteId: fx.luxorSite, title: 'Roles matrix trip', startDate: '2027-07-31', endDate: '2027-08-03',
  seats: 20, priceMinor: 100_000, depositMinor: 20_000, currency: 'EUR', balanceDueDate: '2027-05-01',
  cancellationTiers: [{ until: '2099-01-01', refundPct: 100 }], minGroupSize: 1,
  meetingPoint: { name: 'Hotel (test)', lat: 25.69, lon: 32.64, time: '2027-08-02T06:30:00+03:00' }, ...over,
})

async function publishedTrip(org: string, over: Record<string, unknown>) {
  const t = await api('/api/trips', { method: 'POST', body: tripBody(over), cookie: org })
  expect(t.status, JSON.stringify(t.body)).toBe(201)
  expect((await api(`/api/trips/${t.body.id}/publish`, { method: 'POST', cookie: org })).status).toBe(200)
  return t.body.id as number
}

/** The booked traveller's active hold on ownTrip, made anew when an earlier row cancelled it. */
async function activeHold(): Promise<number> {
  const r = await api(`/api/trips/${fx.ownTrip}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: fx.cookies.get('booked') })
  if (r.status === 201) return r.body.id
  if (r.status === 409 && r.body.code === 'hold_exists') return r.body.bookingId
  throw new Error(`could not hold a seat for the booked traveller: ${r.status} ${JSON.stringify(r.body)}`)
}

/** A voyage in the demo workspace (a ship out of Málaga the evening before 2 August 2027). */
const voyageBody = () => ({ name: `Roles voyage ${unique()}`, departure: { lat: 36.7, lon: -4.4, utc: '2027-08-01T20:00:00Z' }, speedKn: 16 })
async function newVoyage(): Promise<number> {
  const r = await api(`/api/workspaces/${fx.luxorWs}/voyages`, { method: 'POST', body: voyageBody(), cookie: fx.cookies.get('org') })
  if (r.status !== 201) throw new Error(`could not plan a voyage: ${r.status} ${JSON.stringify(r.body)}`)
  return r.body.id
}
let sharedVoyage = 0
const aVoyage = async () => (sharedVoyage ||= await newVoyage())

let seq = 0
const unique = () => `${Date.now().toString(36)}-${++seq}`

interface Row {
  method: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE'
  /** The route file under server/api, without `.ts`: the coverage check matches rows to files by it. */
  file: string
  path: (c: Caller) => string | Promise<string>
  /** A JSON body; absent for GET/DELETE and for the multipart upload routes (sent with no body). */
  body?: (c: Caller) => unknown
  want: Want
  /** Why a status is what it is, where the table alone does not say. */
  note?: string
}

const json = (b: unknown) => () => b
// Common shapes, caller order as in CALLERS.
const PUBLIC = (s: number): Want => [s, s, s, s, s, s]
const USER = (s: number): Want => [401, s, s, s, s, s]
const GUIDES = (s: number): Want => [401, 403, 403, s, s, s]
const STAFF = (s: number): Want => [401, 403, 403, s, 404, s]
/** A trip's staff routes: a guide not assigned to the trip gets 403 not_assigned, not a 404. */
const TRIP_STAFF = (s: number): Want => [401, 403, 403, s, 403, s]
const ORGANISER_ONLY = (s: number): Want => [401, 403, 403, 403, 403, s]

const ROWS: Row[] = [
  // Signing in, signing up and confirming take a body; an empty one is a 400 for anyone.
  { method: 'POST', file: 'auth/login.post', path: () => '/api/auth/login', body: json({}), want: PUBLIC(400) },
  { method: 'POST', file: 'auth/register.post', path: () => '/api/auth/register', body: json({}), want: PUBLIC(400) },
  { method: 'POST', file: 'auth/verify-email.post', path: () => '/api/auth/verify-email', body: json({}), want: PUBLIC(400) },
  // A reset request answers 202 for any address, known or not (each caller asks for its own, under the per-address limit).
  { method: 'POST', file: 'auth/password-reset/index.post', path: () => '/api/auth/password-reset', body: (c) => ({ email: `roles-reset-${c}@umbrafield.test` }), want: PUBLIC(202) },
  { method: 'POST', file: 'auth/password-reset/confirm.post', path: () => '/api/auth/password-reset/confirm', body: json({}), want: PUBLIC(400) },
  { method: 'POST', file: 'auth/confirmation.post', path: () => '/api/auth/confirmation', body: json({}), want: USER(200), note: 'every caller here is confirmed: "already confirmed"' },

  { method: 'GET', file: 'bookings/index.get', path: () => '/api/bookings', want: USER(200) },
  { method: 'GET', file: 'bookings/[id]/index.get', path: () => `/api/bookings/${fx.luxorBooking}`, want: [401, 404, 200, 404, 404, 200], note: 'the owner and organisers' },
  { method: 'PATCH', file: 'bookings/[id].patch', path: async () => `/api/bookings/${await activeHold()}`, body: json({ seats: 2 }), want: [401, 404, 200, 404, 404, 404], note: 'only the holder changes the seats of a hold' },
  { method: 'POST', file: 'bookings/[id]/checkout.post', path: async () => `/api/bookings/${await activeHold()}/checkout`, body: json({}), want: [401, 404, 200, 404, 404, 404], note: 'only the holder pays' },
  { method: 'POST', file: 'bookings/[id]/cancel.post', path: async () => `/api/bookings/${await activeHold()}/cancel`, body: json({}), want: [401, 404, 200, 404, 404, 200], note: 'the holder or an organiser; a fresh hold for each caller' },
  { method: 'POST', file: 'bookings/[id]/refund.post', path: () => `/api/bookings/${fx.luxorBooking}/refund`, body: json({ amountMinor: 100, reason: 'roles matrix' }), want: ORGANISER_ONLY(200) },

  { method: 'GET', file: 'climatology/index.get', path: () => '/api/climatology', want: GUIDES(200) },
  { method: 'POST', file: 'climatology/index.post', path: () => '/api/climatology', want: ORGANISER_ONLY(400), note: 'multipart only: no form is a 400 naming the fields' },

  { method: 'GET', file: 'eclipses/index.get', path: () => '/api/eclipses', want: PUBLIC(200) },
  { method: 'GET', file: 'eclipses/[id]/index.get', path: () => '/api/eclipses/2027-08-02', want: PUBLIC(200) },
  { method: 'GET', file: 'eclipses/[id]/local.get', path: () => '/api/eclipses/2027-08-02/local?lat=25.7&lon=32.6', want: PUBLIC(200) },
  { method: 'GET', file: 'eclipses/[id]/path.get', path: () => '/api/eclipses/2027-08-02/path?step=600', want: PUBLIC(200) },
  { method: 'PUT', file: 'eclipses/[id]/elements.put', path: () => '/api/eclipses/2027-08-02/elements', body: json({}), want: ORGANISER_ONLY(400) },
  { method: 'DELETE', file: 'eclipses/[id]/elements.delete', path: () => '/api/eclipses/2027-08-02/elements', want: ORGANISER_ONLY(200), note: 'no published set stored: removing none is fine' },
  { method: 'PATCH', file: 'eclipses/[id]/settings.patch', path: () => '/api/eclipses/2027-08-02/settings', body: json({ deltaTSec: null }), want: ORGANISER_ONLY(200), note: 'null clears the ΔT override (there is none)' },

  { method: 'GET', file: 'health.get', path: () => '/api/health', want: PUBLIC(200) },
  { method: 'GET', file: 'me.get', path: () => '/api/me', want: USER(200) },
  { method: 'PATCH', file: 'me.patch', path: () => '/api/me', body: json({}), want: USER(200), note: 'an empty patch changes nothing' },
  // Two-factor: anyone signed in may look at and start their own set-up; confirming or turning off needs a code.
  { method: 'GET', file: 'me/totp/index.get', path: () => '/api/me/totp', want: USER(200) },
  { method: 'POST', file: 'me/totp/index.post', path: () => '/api/me/totp', body: json({}), want: USER(200), note: 'a pending secret, not yet on' },
  { method: 'POST', file: 'me/totp/confirm.post', path: () => '/api/me/totp/confirm', body: json({}), want: USER(400) },
  { method: 'DELETE', file: 'me/totp/index.delete', path: () => '/api/me/totp', body: json({}), want: USER(400) },
  { method: 'GET', file: 'settings/security.get', path: () => '/api/settings/security', want: ORGANISER_ONLY(200) },
  { method: 'PATCH', file: 'settings/security.patch', path: () => '/api/settings/security', body: json({ requireStaffTotp: false }), want: ORGANISER_ONLY(200), note: 'the rule stays off' },

  { method: 'GET', file: 'outbox/index.get', path: () => '/api/outbox', want: ORGANISER_ONLY(200) },
  { method: 'POST', file: 'outbox/[id]/retry.post', path: () => `/api/outbox/${fx.outboxId}/retry`, body: json({}), want: ORGANISER_ONLY(200), note: 'a message marked failed in beforeAll' },

  { method: 'GET', file: 'places/index.get', path: () => '/api/places?q=Luxor', want: GUIDES(200) },
  { method: 'GET', file: 'reconciliation/index.get', path: () => '/api/reconciliation', want: ORGANISER_ONLY(200) },
  { method: 'POST', file: 'reconciliation/run.post', path: () => '/api/reconciliation/run', body: json({}), want: ORGANISER_ONLY(200) },

  { method: 'PATCH', file: 'sites/[id].patch', path: () => `/api/sites/${fx.luxorSite}`, body: json({}), want: ORGANISER_ONLY(200), note: 'an empty patch changes nothing' },
  { method: 'DELETE', file: 'sites/[id].delete', path: () => `/api/sites/${fx.spareSite}`, want: ORGANISER_ONLY(200) },

  { method: 'POST', file: 'stripe/webhook.post', path: () => '/api/stripe/webhook', body: json({}), want: PUBLIC(400), note: 'unsigned: refused for anyone' },

  { method: 'GET', file: 'trips/index.get', path: () => '/api/trips', want: PUBLIC(200) },
  { method: 'POST', file: 'trips/index.post', path: () => '/api/trips', body: () => tripBody({ title: `Roles matrix ${unique()}` }), want: ORGANISER_ONLY(201) },
  { method: 'GET', file: 'trips/[id]/index.get', path: () => `/api/trips/${fx.luxorTrip}`, want: PUBLIC(200) },
  { method: 'POST', file: 'trips/[id]/publish.post', path: () => `/api/trips/${fx.luxorTrip}/publish`, body: json({}), want: ORGANISER_ONLY(200), note: 'already published: publishing again changes nothing' },
  { method: 'GET', file: 'trips/[id]/bookings/index.get', path: () => `/api/trips/${fx.luxorTrip}/bookings`, want: ORGANISER_ONLY(200) },
  { method: 'GET', file: 'trips/[id]/bookings.csv.get', path: () => `/api/trips/${fx.luxorTrip}/bookings.csv`, want: ORGANISER_ONLY(200) },
  { method: 'POST', file: 'trips/[id]/bookings/index.post', path: () => `/api/trips/${fx.openTrip}/bookings`, body: json({ seats: 1 }), want: USER(201), note: 'any confirmed account may hold seats' },
  { method: 'POST', file: 'trips/[id]/waitlist.post', path: () => `/api/trips/${fx.fullTrip}/waitlist`, body: json({ seats: 1 }), want: USER(201) },
  { method: 'GET', file: 'trips/[id]/briefing.get', path: () => `/api/trips/${fx.luxorTrip}/briefing`, want: [401, 404, 200, 200, 403, 200], note: 'booked travellers, the trip\'s guides, organisers; an unassigned guide gets 403 not_assigned' },
  { method: 'PUT', file: 'trips/[id]/checklist.put', path: () => `/api/trips/${fx.luxorTrip}/checklist`, body: json({ items: ['ISO 12312-2 eclipse viewers', 'Water'] }), want: ORGANISER_ONLY(200) },
  { method: 'PUT', file: 'trips/[id]/cues.put', path: () => `/api/trips/${fx.luxorTrip}/cues`, body: json({ offsets: {} }), want: [401, 403, 403, 200, 403, 200], note: 'an unassigned guide is told so: 403 not_assigned' },
  { method: 'GET', file: 'trips/[id]/itinerary.get', path: () => `/api/trips/${fx.luxorTrip}/itinerary`, want: ORGANISER_ONLY(200) },
  { method: 'POST', file: 'trips/[id]/itinerary.post', path: () => `/api/trips/${fx.luxorTrip}/itinerary`, body: json({ confirm: true }), want: ORGANISER_ONLY(200) },
  { method: 'GET', file: 'trips/[id]/participants.get', path: () => `/api/trips/${fx.luxorTrip}/participants`, want: [401, 403, 403, 200, 403, 200], note: 'an unassigned guide is told so: 403 not_assigned' },
  { method: 'GET', file: 'trips/[id]/timetable.get', path: () => `/api/trips/${fx.luxorTrip}/timetable`, want: [401, 403, 403, 200, 403, 200], note: 'an unassigned guide is told so: 403 not_assigned' },
  { method: 'GET', file: 'trips/[id]/timetable.pdf.get', path: () => `/api/trips/${fx.luxorTrip}/timetable.pdf`, want: [401, 403, 403, 200, 403, 200], note: 'an unassigned guide is told so: 403 not_assigned' },
  { method: 'GET', file: 'trips/[id]/sites/[siteId]/timetable.ics.get', path: () => `/api/trips/${fx.luxorTrip}/sites/${fx.luxorSite}/timetable.ics`, want: [401, 403, 403, 200, 403, 200], note: 'an unassigned guide is told so: 403 not_assigned' },

  { method: 'GET', file: 'users/index.get', path: () => '/api/users', want: ORGANISER_ONLY(200) },
  { method: 'POST', file: 'users/index.post', path: () => '/api/users', body: () => ({ name: 'Roles Invitee', email: `roles-${unique()}@umbrafield.test`, role: 'guide' }), want: ORGANISER_ONLY(201) },
  { method: 'PATCH', file: 'users/[id].patch', path: () => `/api/users/${fx.otherId}`, body: json({ role: 'guide' }), want: ORGANISER_ONLY(200), note: 'the role it already has' },

  { method: 'GET', file: 'workspaces/index.get', path: () => '/api/workspaces', want: GUIDES(200), note: 'a guide on no trip gets an empty list' },
  { method: 'POST', file: 'workspaces/index.post', path: () => '/api/workspaces', body: () => ({ eclipseId: '2027-08-02', name: `Roles matrix ${unique()}` }), want: ORGANISER_ONLY(201) },
  { method: 'GET', file: 'workspaces/[id]/index.get', path: () => `/api/workspaces/${fx.luxorWs}`, want: STAFF(200) },
  { method: 'PATCH', file: 'workspaces/[id]/index.patch', path: () => `/api/workspaces/${fx.luxorWs}`, body: json({}), want: ORGANISER_ONLY(200), note: 'an empty patch changes nothing' },
  { method: 'GET', file: 'workspaces/[id]/sites/index.get', path: () => `/api/workspaces/${fx.luxorWs}/sites`, want: STAFF(200) },
  { method: 'POST', file: 'workspaces/[id]/sites/index.post', path: () => `/api/workspaces/${fx.luxorWs}/sites`, body: () => ({ name: `Roles site ${unique()}`, lat: 25.9, lon: 32.7 }), want: ORGANISER_ONLY(201) },
  { method: 'POST', file: 'workspaces/[id]/sites/import.post', path: () => `/api/workspaces/${fx.luxorWs}/sites/import`, want: ORGANISER_ONLY(400), note: 'multipart only: no file is a 400 naming it' },
  { method: 'GET', file: 'workspaces/[id]/cloud-layer.get', path: () => `/api/workspaces/${fx.luxorWs}/cloud-layer`, want: STAFF(200) },
  { method: 'GET', file: 'workspaces/[id]/expected-seen/index.get', path: () => `/api/workspaces/${fx.luxorWs}/expected-seen`, want: STAFF(200) },
  { method: 'GET', file: 'workspaces/[id]/expected-seen/point.get', path: () => `/api/workspaces/${fx.luxorWs}/expected-seen/point?lat=25.7&lon=32.6`, want: STAFF(200) },
  { method: 'GET', file: 'workspaces/[id]/best-spots.get', path: () => `/api/workspaces/${fx.luxorWs}/best-spots?lat=25.7&lon=32.6&radiusKm=20&limit=2`, want: STAFF(200) },
  { method: 'GET', file: 'workspaces/[id]/terrain/index.get', path: () => `/api/workspaces/${fx.luxorWs}/terrain`, want: STAFF(200) },
  { method: 'POST', file: 'workspaces/[id]/terrain/index.post', path: () => `/api/workspaces/${fx.luxorWs}/terrain`, want: ORGANISER_ONLY(400), note: 'multipart only: no file is a 400 naming it' },
  { method: 'GET', file: 'workspaces/[id]/export.csv.get', path: () => `/api/workspaces/${fx.luxorWs}/export.csv`, want: STAFF(200) },
  { method: 'GET', file: 'workspaces/[id]/export.geojson.get', path: () => `/api/workspaces/${fx.luxorWs}/export.geojson`, want: STAFF(200) },
  { method: 'GET', file: 'workspaces/[id]/export.gpx.get', path: () => `/api/workspaces/${fx.luxorWs}/export.gpx`, want: STAFF(200) },
  { method: 'GET', file: 'workspaces/[id]/export.kml.get', path: () => `/api/workspaces/${fx.luxorWs}/export.kml`, want: STAFF(200) },

  // ── Trips after publishing, guides and the guide's desk ──
  { method: 'PATCH', file: 'trips/[id]/index.patch', path: () => `/api/trips/${fx.luxorTrip}`, body: json({}), want: ORGANISER_ONLY(200), note: 'an empty edit changes nothing' },
  {
    method: 'POST', file: 'trips/[id]/unpublish.post', body: json({}), want: ORGANISER_ONLY(200), note: 'the organiser unpublishes a fresh trip nobody booked',
    path: async (c) => `/api/trips/${c === 'org' ? await publishedTrip(fx.cookies.get('org')!, { title: `Roles matrix: unpublish ${unique()}` }) : fx.luxorTrip}/unpublish`,
  },
  { method: 'GET', file: 'trips/[id]/guides.get', path: () => `/api/trips/${fx.luxorTrip}/guides`, want: ORGANISER_ONLY(200) },
  { method: 'PUT', file: 'trips/[id]/guides.put', path: () => `/api/trips/${fx.openTrip}/guides`, body: json({ userIds: [] }), want: ORGANISER_ONLY(200), note: 'the open trip has no guides: none stays none' },
  { method: 'GET', file: 'me/trips.get', path: () => '/api/me/trips', want: GUIDES(200), note: 'a guide on no trip gets an empty list' },
  // (end of block)

  // ── Alerts, messages and search ──
  { method: 'GET', file: 'alerts/index.get', path: () => '/api/alerts', want: ORGANISER_ONLY(200) },
  { method: 'POST', file: 'alerts/read.post', path: () => '/api/alerts/read', body: json({ all: true }), want: ORGANISER_ONLY(200), note: 'only the caller\'s own alerts' },
  { method: 'PUT', file: 'alerts/preferences.put', path: () => '/api/alerts/preferences', body: json({ mode: 'immediate' }), want: ORGANISER_ONLY(200) },
  { method: 'GET', file: 'trips/[id]/messages/index.get', path: () => `/api/trips/${fx.luxorTrip}/messages`, want: ORGANISER_ONLY(200) },
  { method: 'POST', file: 'trips/[id]/messages/index.post', path: () => `/api/trips/${fx.luxorTrip}/messages`, body: json({ subject: 'Roles matrix', body: 'A message to the group.', to: 'confirmed' }), want: ORGANISER_ONLY(202) },
  { method: 'POST', file: 'trips/[id]/messages/preview.post', path: () => `/api/trips/${fx.luxorTrip}/messages/preview`, body: json({ subject: 'Roles matrix', body: 'A preview.', to: 'all' }), want: ORGANISER_ONLY(200) },
  { method: 'GET', file: 'bookings/[id]/messages.get', path: () => `/api/bookings/${fx.luxorBooking}/messages`, want: [401, 404, 200, 404, 404, 200], note: 'the booking\'s traveller and organisers' },
  // (end of block)

  // ── Planning details ──
  { method: 'POST', file: 'sites/[id]/height-from-terrain.post', path: () => `/api/sites/${fx.luxorSite}/height-from-terrain`, body: json({}), want: ORGANISER_ONLY(400), note: 'the demo has no terrain model: 400 naming elevationM' },
  // (end of block)

  // ── Participants and the manifest ──
  { method: 'GET', file: 'bookings/[id]/participants/index.get', path: () => `/api/bookings/${fx.luxorBooking}/participants`, want: [401, 404, 200, 404, 404, 200], note: 'the booking\'s traveller and organisers' },
  { method: 'PUT', file: 'bookings/[id]/participants/[seat].put', path: () => `/api/bookings/${fx.luxorBooking}/participants/2`, body: json({ fullName: 'Roles matrix (test)' }), want: [401, 404, 200, 404, 404, 200], note: 'the booking\'s traveller and organisers write' },
  { method: 'GET', file: 'trips/[id]/manifest/index.get', path: () => `/api/trips/${fx.luxorTrip}/manifest`, want: STAFF(200), note: 'guides get no passport or birth-date keys' },
  { method: 'GET', file: 'trips/[id]/manifest/access-log.get', path: () => `/api/trips/${fx.luxorTrip}/manifest/access-log`, want: ORGANISER_ONLY(200) },
  { method: 'POST', file: 'trips/[id]/manifest/remind.post', path: () => `/api/trips/${fx.luxorTrip}/manifest/remind`, body: () => ({ bookingId: fx.luxorBooking }), want: ORGANISER_ONLY(202), note: 'the demo booking\'s second seat is incomplete' },
  { method: 'GET', file: 'trips/[id]/manifest.csv.get', path: () => `/api/trips/${fx.luxorTrip}/manifest.csv`, want: ORGANISER_ONLY(200) },
  { method: 'GET', file: 'trips/[id]/manifest.xlsx.get', path: () => `/api/trips/${fx.luxorTrip}/manifest.xlsx`, want: ORGANISER_ONLY(200) },
  { method: 'GET', file: 'trips/[id]/emergency-sheet.get', path: () => `/api/trips/${fx.luxorTrip}/emergency-sheet`, want: STAFF(200) },
  // (end of block)

  // ── Personal data: export and erasure ──
  { method: 'GET', file: 'me/export.get', path: () => '/api/me/export', want: USER(200), note: 'each caller gets their own data' },
  { method: 'POST', file: 'me/erase.post', path: () => '/api/me/erase', body: json({ password: 'not the password', confirm: true }), want: USER(400), note: 'a wrong password erases nothing (400 naming it)' },
  // (end of block)

  // ── Forecast outlook ──
  { method: 'GET', file: 'trips/[id]/outlook/index.get', path: () => `/api/trips/${fx.luxorTrip}/outlook`, want: TRIP_STAFF(409), note: 'the suite runs months before the eclipse: 409 too_early (the trip\'s guides and organisers get that far)' },
  { method: 'POST', file: 'trips/[id]/outlook/refresh.post', path: () => `/api/trips/${fx.luxorTrip}/outlook/refresh`, body: json({}), want: ORGANISER_ONLY(409), note: 'too early to fetch, as above' },
  { method: 'PUT', file: 'trips/[id]/outlook/sites/[siteId].put', path: () => `/api/trips/${fx.luxorTrip}/outlook/sites/${fx.luxorSite}`, body: json({ driveMinutes: 20 }), want: ORGANISER_ONLY(200) },
  { method: 'DELETE', file: 'trips/[id]/outlook/sites/[siteId].delete', path: () => `/api/trips/${fx.luxorTrip}/outlook/sites/${fx.luxorSite}`, want: ORGANISER_ONLY(200), note: 'idempotent: removing nothing is fine' },
  // (end of block)

  // ── The day's decision and acknowledgements ──
  { method: 'GET', file: 'trips/[id]/decision.get', path: () => `/api/trips/${fx.luxorTrip}/decision`, want: TRIP_STAFF(200), note: 'organisers and the trip\'s guides' },
  { method: 'POST', file: 'trips/[id]/decision.post', path: () => `/api/trips/${fx.luxorTrip}/decision`, body: () => ({ siteId: fx.luxorSite, departAt: '2027-08-02T05:00:00+03:00' }), want: ORGANISER_ONLY(201) },
  { method: 'POST', file: 'trips/[id]/decision/resend.post', path: () => `/api/trips/${fx.luxorTrip}/decision/resend`, body: json({}), want: ORGANISER_ONLY(200), note: 'after the decision row: sends again to whoever has not acknowledged' },
  { method: 'GET', file: 'ack/[token].get', path: () => '/api/ack/roles-matrix-unknown-token-000000000', want: PUBLIC(404), note: 'no sign-in; an unknown link' },
  { method: 'POST', file: 'ack/[token].post', path: () => '/api/ack/roles-matrix-unknown-token-000000000', body: json({}), want: PUBLIC(404), note: 'no sign-in; an unknown link' },
  { method: 'GET', file: 'push/key.get', path: () => '/api/push/key', want: USER(200) },
  { method: 'POST', file: 'push/subscriptions.post', path: () => '/api/push/subscriptions', body: json({}), want: USER(400), note: 'no subscription in the body' },
  // (end of block)

  // ── Speed and usability ──
  // (end of block)

  // ── Languages ──
  // (end of block)

  // ── Voyages ──
  { method: 'POST', file: 'workspaces/[id]/voyages/index.post', path: () => `/api/workspaces/${fx.luxorWs}/voyages`, body: () => voyageBody(), want: ORGANISER_ONLY(201) },
  { method: 'GET', file: 'workspaces/[id]/voyages/index.get', path: () => `/api/workspaces/${fx.luxorWs}/voyages`, want: STAFF(200) },
  { method: 'GET', file: 'voyages/[id]/index.get', path: async () => `/api/voyages/${await aVoyage()}`, want: STAFF(200) },
  { method: 'DELETE', file: 'voyages/[id]/index.delete', path: async (c) => `/api/voyages/${c === 'org' ? await newVoyage() : await aVoyage()}`, want: ORGANISER_ONLY(200), note: 'the organiser deletes a voyage of its own' },
  { method: 'GET', file: 'voyages/[id]/timetable.pdf.get', path: async () => `/api/voyages/${await aVoyage()}/timetable.pdf`, want: STAFF(200) },
  // (end of block)
]

/**
 * Session-ending rows run last, each caller with a fresh sign-in: both raise the account's session
 * version, which would end the sessions every other row uses.
 */
const SESSION_ENDING: Row[] = [
  { method: 'POST', file: 'auth/logout.post', path: () => '/api/auth/logout', body: json({}), want: PUBLIC(200) },
  { method: 'POST', file: 'auth/sign-out-everywhere.post', path: () => '/api/auth/sign-out-everywhere', body: json({}), want: USER(200) },
]

function routeFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f)
    return statSync(p).isDirectory() ? routeFiles(p) : [p]
  })
}

beforeAll(async () => {
  const org = await signIn(ORGANISER)
  const invite = async (name: string) => {
    const email = `roles-${name}-${unique()}@umbrafield.test`
    const password = `roles-${name}-password`
    const r = await inviteAndChoosePassword(org, { name: `Roles ${name} (test)`, email, role: 'guide' }, password)
    expect(r.status).toBe(201)
    return { email, password, id: r.body.user.id as number }
  }
  const other = await invite('unassigned-guide')
  fx.otherId = other.id
  for (const [c, email, password] of [
    ['trav', TRAVELLER, 'eclipse-demo'], ['booked', TRAVELLER2, 'eclipse-demo'], ['guide', GUIDE, 'eclipse-demo'],
    ['other', other.email, other.password], ['org', ORGANISER, 'eclipse-demo'],
  ] as Array<[Caller, string, string]>) {
    fx.emails.set(c, email)
    fx.passwords.set(c, password)
    fx.cookies.set(c, c === 'org' ? org : await signIn(email, password))
  }
  fx.cookies.set('anon', '')

  // The demo's Luxor trip and the booked traveller's confirmed booking on it (see the demo seed).
  const trips = await api('/api/trips', { cookie: org })
  const luxor = trips.body.data.find((t: { title: string }) => t.title === DEMO_TRIP_TITLE)
  fx.luxorTrip = luxor.id
  const trip = await db.selectFrom('trips').select(['workspace_id', 'primary_site_id']).where('id', '=', luxor.id).executeTakeFirstOrThrow()
  fx.luxorWs = trip.workspace_id
  fx.luxorSite = trip.primary_site_id
  expect((await db.selectFrom('workspaces').select('name').where('id', '=', fx.luxorWs).executeTakeFirstOrThrow()).name).toBe(DEMO_WORKSPACE.name)
  const own = await api('/api/bookings', { cookie: fx.cookies.get('booked') })
  const confirmed = own.body.data.filter((b: { tripId: number; status: string }) => b.tripId === fx.luxorTrip && b.status === 'confirmed')
  expect(confirmed).toHaveLength(1)
  fx.luxorBooking = confirmed[0].id
  // The traveller without a booking really has none, anywhere.
  expect((await api('/api/bookings', { cookie: fx.cookies.get('trav') })).body.data).toEqual([])

  fx.ownTrip = await publishedTrip(org, { title: 'Roles matrix: the booked traveller\'s hold' })
  fx.openTrip = await publishedTrip(org, { title: 'Roles matrix: open for holds' })
  fx.fullTrip = await publishedTrip(org, { title: 'Roles matrix: full', seats: 1 })
  const filler = await invite('filler')
  const fill = await api(`/api/trips/${fx.fullTrip}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: await signIn(filler.email, filler.password) })
  expect(fill.status).toBe(201)

  const spare = await api(`/api/workspaces/${fx.luxorWs}/sites`, { method: 'POST', body: { name: 'Roles matrix spare site', lat: 26, lon: 32.5 }, cookie: org })
  expect(spare.status).toBe(201)
  fx.spareSite = spare.body.id

  // A message that failed to send, for the retry row (the fake mail server delivers everything).
  // One without a one-time link: those cannot be retried once failed (their sealed link is cleared).
  // Only a message the worker has finished with: one still being sent would be marked sent after us.
  const msg = await until(
    () => db.selectFrom('outbox').select('id').where('text', 'not like', '%{{secret_token}}%').where('status', '=', 'sent').orderBy('id').executeTakeFirst(),
    (m) => !!m, 30_000)
  const marked = await db.updateTable('outbox').set({ status: 'failed', last_error: 'roles matrix: marked failed' }).where('id', '=', msg!.id).where('status', '=', 'sent').executeTakeFirst()
  expect(Number(marked.numUpdatedRows)).toBe(1)
  fx.outboxId = msg!.id
}, 120_000)

async function call(row: Row, caller: Caller, cookie: string) {
  const path = await row.path(caller)
  const body = row.body?.(caller)
  return { path, r: await api(path, { method: row.method, cookie: cookie || undefined, ...(body === undefined ? {} : { body }) }) }
}

function check(row: Row, caller: Caller, path: string, status: number, body: unknown, seen: string[]) {
  const want = row.want[CALLERS.indexOf(caller)]
  if (status >= 500) seen.push(`${caller}: ${row.method} ${path} answered ${status} ${JSON.stringify(body).slice(0, 200)}`)
  else if (status !== want) seen.push(`${caller}: ${row.method} ${path} got ${status}, want ${want} ${JSON.stringify(body).slice(0, 200)}`)
}

describe('the role matrix', () => {
  it('has exactly one row for every route file under server/api, and no row for a file that is not there', () => {
    const root = resolve(__dirname, '../../server/api')
    const files = routeFiles(root).map((f) => relative(root, f).replace(/\\/g, '/').replace(/\.ts$/, '')).sort()
    const rows = [...ROWS, ...SESSION_ENDING].map((r) => r.file)
    expect(new Set(rows).size, 'a route listed twice').toBe(rows.length)
    expect(files.filter((f) => !rows.includes(f)), 'route files with no row in the matrix').toEqual([])
    expect(rows.filter((f) => !files.includes(f)), 'rows for route files that do not exist').toEqual([])
    // The row's method is the one in its file name.
    for (const r of [...ROWS, ...SESSION_ENDING]) expect(r.file.endsWith(`.${r.method.toLowerCase()}`), r.file).toBe(true)
  })

  it.each(ROWS.map((r) => [`${r.method} ${r.file}`, r] as const))('%s', async (_, row) => {
    const seen: string[] = []
    for (const caller of CALLERS) {
      const { path, r } = await call(row, caller, fx.cookies.get(caller)!)
      check(row, caller, path, r.status, r.body, seen)
    }
    expect(seen).toEqual([])
  }, 60_000)

  it.each(SESSION_ENDING.map((r) => [`${r.method} ${r.file}`, r] as const))('%s (each caller signed in afresh; run last)', async (_, row) => {
    const seen: string[] = []
    for (const caller of CALLERS) {
      const cookie = caller === 'anon' ? '' : await signIn(fx.emails.get(caller)!, fx.passwords.get(caller))
      const { path, r } = await call(row, caller, cookie)
      check(row, caller, path, r.status, r.body, seen)
      // The session really ended: the same cookie is now refused.
      if (caller !== 'anon' && r.status === 200) {
        const me = await fetch(url('/api/me'), { headers: { cookie } })
        if (me.status !== 401) seen.push(`${caller}: the session still works after ${row.file} (${me.status})`)
      }
    }
    expect(seen).toEqual([])
  }, 60_000)
})
