import type { Kysely, Transaction } from 'kysely'
import type { TripPatchInput } from '../../shared/schemas/tripOps'
import type { SitePatchInput } from '../../shared/schemas/sites'
import { localTime } from '../../shared/time/local'
import type { Database, User } from '../database/schema'
import { audit } from './audit'
import { offerWaitlist, type BookingConfig } from './bookings'
import { nowIso } from './clock'
import * as T from './mailTemplates'
import { enqueueMail } from './outbox'
import { getSite, NotFoundError, SiteInUseError, updateSite, zoneAt } from './planning'
import { getTripRow, lockTripRow, seatUse, tiersOf, TripConflictError, TripRuleError, type TripRow } from './trips'

type Db = Kysely<Database> | Transaction<Database>

/** One change as travellers and the audit log read it. */
export interface Change { label: string; from: string; to: string }
/** A change as told to travellers: with its field's key (and a dropped fallback site's name) for the mail's language. */
type ToldChange = Change & { key?: string; site?: string }

/** Travellers who hold seats on a trip now: confirmed bookings and holds that have not lapsed. */
export async function bookedTravellers(db: Db, tripId: number) {
  return db.selectFrom('bookings').innerJoin('users', 'users.id', 'bookings.user_id')
    .select(['bookings.id as bookingId', 'bookings.seats', 'users.id as userId', 'users.name', 'users.email', 'users.locale'])
    .where('bookings.trip_id', '=', tripId)
    .where((eb) => eb.or([eb('bookings.status', '=', 'confirmed'), eb.and([eb('bookings.status', '=', 'held'), eb('bookings.hold_expires_at', '>', nowIso())])]))
    .orderBy('bookings.id').execute()
}

const meetingText = (m: { name: string; lat: number; lon: number; timeUtc: string }) => {
  const l = localTime(Date.parse(m.timeUtc), zoneAt(m.lat, m.lon))
  return `${m.name}, ${l.local.slice(0, 16)} local time (UTC${l.utcOffset}, ${l.zone})`
}

async function siteNames(db: Db, ids: number[]): Promise<Map<number, string>> {
  if (!ids.length) return new Map()
  const rows = await db.selectFrom('sites').select(['id', 'name']).where('id', 'in', ids).execute()
  return new Map(rows.map((r) => [r.id, r.name]))
}

/** Writes one "your trip has changed" e-mail per booking, in the caller's transaction. */
async function tellTravellers(trx: Db, trip: Pick<TripRow, 'id' | 'title'>, changes: ToldChange[], appUrl: string): Promise<number> {
  if (!changes.length) return 0
  const who = await bookedTravellers(trx, trip.id)
  for (const b of who) {
    await enqueueMail(trx, { kind: 'trip-changed', to: { email: b.email, name: b.name }, bookingId: b.bookingId, tripId: trip.id, locale: b.locale,
      ...T.tripChanged({ name: b.name, tripTitle: trip.title, changes, tripUrl: `${appUrl}/trips/${trip.id}`, locale: b.locale }) })
  }
  return who.length
}

/**
 * An organiser's edit of a trip, in one transaction with the trip row locked (so seats taken cannot
 * change while the new seat count is checked). Bookings keep the price and deposit they agreed
 * (they carry their own amounts). Every change is audited with its old and new value; travellers
 * holding seats are e-mailed about new dates, meeting point or sites.
 */
export async function updateTrip(db: Kysely<Database>, user: User, id: number, p: TripPatchInput, cfg: BookingConfig) {
  return db.transaction().execute(async (trx) => {
    const t = await lockTripRow(trx, id)
    if (!t) throw new NotFoundError('No such trip')
    const oldBackups = (await trx.selectFrom('trip_backup_sites').select('site_id').where('trip_id', '=', id).orderBy('rank').execute()).map((r) => r.site_id)
    const n = {
      title: p.title ?? t.title, description: p.description ?? t.description, startDate: p.startDate ?? t.start_date, endDate: p.endDate ?? t.end_date,
      priceMinor: p.priceMinor ?? t.price_minor, depositMinor: p.depositMinor ?? t.deposit_minor, seats: p.seats ?? t.seats,
      balanceDueDate: p.balanceDueDate ?? t.balance_due_date, minGroupSize: p.minGroupSize ?? t.min_group_size,
      meeting: p.meetingPoint
        ? { name: p.meetingPoint.name, lat: p.meetingPoint.lat, lon: p.meetingPoint.lon, timeUtc: new Date(p.meetingPoint.time).toISOString() }
        : { name: t.meeting_name, lat: t.meeting_lat, lon: t.meeting_lon, timeUtc: t.meeting_time_utc },
      tiers: p.cancellationTiers ?? tiersOf(t), primarySiteId: p.primarySiteId ?? t.primary_site_id,
      backupSiteIds: p.backupSiteIds ?? oldBackups.filter((s) => s !== p.primarySiteId), salesOpen: p.salesOpen ?? t.sales_open === 1,
    }
    if (n.depositMinor > n.priceMinor) throw new TripRuleError('depositMinor', 'the deposit cannot exceed the price')
    if (n.endDate < n.startDate) throw new TripRuleError('endDate', 'the trip cannot end before it starts')
    if (n.minGroupSize > n.seats) throw new TripRuleError('minGroupSize', 'the minimum group cannot exceed the seats')
    if (n.backupSiteIds.includes(n.primarySiteId)) throw new TripRuleError('backupSiteIds', 'a fallback site cannot be the primary site')
    if (n.seats < t.seats) {
      const use = await seatUse(trx as unknown as Kysely<Database>, id)
      const floor = use.taken + use.offered
      if (n.seats < floor) {
        throw new TripRuleError('seats', `seats cannot go below ${floor}: ${use.taken} ${use.taken === 1 ? 'seat is' : 'seats are'} held or sold${use.offered ? ` and ${use.offered} offered to the waitlist` : ''}`)
      }
    }
    const siteIds = [n.primarySiteId, ...n.backupSiteIds]
    const sites = await trx.selectFrom('sites').select(['id', 'workspace_id', 'name']).where('id', 'in', siteIds).execute()
    for (const sid of siteIds) {
      const s = sites.find((x) => x.id === sid)
      if (!s || s.workspace_id !== t.workspace_id) throw new TripRuleError(sid === n.primarySiteId ? 'primarySiteId' : 'backupSiteIds', `Site ${sid} is not in this trip's planning workspace`)
    }

    // What changed, old and new, in words a traveller (and the audit log's reader) understands.
    const changes: Record<string, Change> = {}
    const put = (key: string, label: string, from: unknown, to: unknown) => {
      const f = typeof from === 'string' ? from : JSON.stringify(from)
      const s = typeof to === 'string' ? to : JSON.stringify(to)
      if (f !== s) changes[key] = { label, from: f, to: s }
    }
    put('title', 'Title', t.title, n.title)
    put('description', 'Description', t.description, n.description)
    put('startDate', 'First day', t.start_date, n.startDate)
    put('endDate', 'Last day', t.end_date, n.endDate)
    put('priceMinor', 'Price per seat (minor units)', String(t.price_minor), String(n.priceMinor))
    put('depositMinor', 'Deposit per seat (minor units)', String(t.deposit_minor), String(n.depositMinor))
    put('seats', 'Seats', String(t.seats), String(n.seats))
    put('balanceDueDate', 'Balance due', t.balance_due_date, n.balanceDueDate)
    put('minGroupSize', 'Minimum group', String(t.min_group_size), String(n.minGroupSize))
    put('meetingPoint', 'Meeting point', meetingText({ name: t.meeting_name, lat: t.meeting_lat, lon: t.meeting_lon, timeUtc: t.meeting_time_utc }), meetingText(n.meeting))
    put('cancellationTiers', 'Cancellation terms', tiersOf(t).map((x) => `until ${x.until}: ${x.refundPct} %`).join('; ') || 'no refund',
      n.tiers.map((x) => `until ${x.until}: ${x.refundPct} %`).join('; ') || 'no refund')
    const names = await siteNames(trx, [...new Set([t.primary_site_id, ...oldBackups, ...siteIds])])
    const nameOf = (sid: number) => names.get(sid) ?? `site ${sid}`
    put('primarySiteId', 'Observing site', nameOf(t.primary_site_id), nameOf(n.primarySiteId))
    put('backupSiteIds', 'Fallback sites', oldBackups.map(nameOf).join(', ') || 'none', n.backupSiteIds.map(nameOf).join(', ') || 'none')
    put('salesOpen', 'Sales', t.sales_open === 1 ? 'open' : 'closed', n.salesOpen ? 'open' : 'closed')
    if (!Object.keys(changes).length) return { id, changed: [] as string[], notified: 0 }

    await trx.updateTable('trips').set({
      title: n.title, description: n.description, start_date: n.startDate, end_date: n.endDate, price_minor: n.priceMinor, deposit_minor: n.depositMinor,
      seats: n.seats, balance_due_date: n.balanceDueDate, min_group_size: n.minGroupSize, meeting_name: n.meeting.name, meeting_lat: n.meeting.lat,
      meeting_lon: n.meeting.lon, meeting_time_utc: n.meeting.timeUtc, cancellation_tiers: JSON.stringify(n.tiers), primary_site_id: n.primarySiteId,
      sales_open: n.salesOpen ? 1 : 0,
    }).where('id', '=', id).execute()
    if (changes.backupSiteIds || changes.primarySiteId) {
      await trx.deleteFrom('trip_backup_sites').where('trip_id', '=', id).execute()
      for (const [rank, sid] of n.backupSiteIds.entries()) await trx.insertInto('trip_backup_sites').values({ trip_id: id, site_id: sid, rank }).execute()
    }
    await audit(trx, { action: 'trip_update', actorUserId: user.id, detail: { tripId: id, changes } })
    // More seats: the waitlist is offered them at once (when sales are open).
    if (n.seats > t.seats && n.salesOpen && t.status === 'published') await offerWaitlist(trx, id, cfg)
    const told = ['startDate', 'endDate', 'meetingPoint', 'primarySiteId', 'backupSiteIds'].flatMap((k) => (changes[k] ? [{ ...changes[k], key: k }] : []))
    const notified = await tellTravellers(trx, { id, title: n.title }, told, cfg.appUrl)
    return { id, changed: Object.keys(changes), notified }
  })
}

/** Takes a published trip off sale and out of view; only while nobody has ever booked it. */
export async function unpublishTrip(db: Kysely<Database>, user: User, id: number) {
  return db.transaction().execute(async (trx) => {
    const t = await lockTripRow(trx, id)
    if (!t) throw new NotFoundError('No such trip')
    const n = Number((await trx.selectFrom('bookings').select((eb) => eb.fn.countAll<number>().as('n')).where('trip_id', '=', id).executeTakeFirstOrThrow()).n)
    if (n > 0) throw new TripConflictError('has_bookings', `This trip has ${n} booking${n === 1 ? '' : 's'}: close sales instead of unpublishing it`, { bookings: n })
    await trx.updateTable('trips').set({ status: 'draft' }).where('id', '=', id).execute()
    if (t.status !== 'draft') await audit(trx, { action: 'trip_unpublish', actorUserId: user.id, detail: { tripId: id } })
    return { id, status: 'draft' as const }
  })
}

/** Guide accounts, each marked whether assigned to the trip (organisers assigned as guides are listed too). */
export async function tripGuides(db: Kysely<Database>, id: number) {
  await getTripRow(db, id)
  const assigned = new Set((await db.selectFrom('trip_guides').select('user_id').where('trip_id', '=', id).execute()).map((r) => r.user_id))
  const users = await db.selectFrom('users').select(['id', 'name', 'email', 'role']).where('role', 'in', ['guide', 'organiser']).orderBy('name').execute()
  const data = users.filter((u) => u.role === 'guide' || assigned.has(u.id)).map((u) => ({ id: u.id, name: u.name, email: u.email, role: u.role, assigned: assigned.has(u.id) }))
  return { data, meta: { assigned: assigned.size } }
}

/** Sets the trip's guides to exactly these accounts (guides or organisers); audits who was added and removed. */
export async function setTripGuides(db: Kysely<Database>, user: User, id: number, userIds: number[]) {
  const wanted = [...new Set(userIds)]
  await db.transaction().execute(async (trx) => {
    const t = await lockTripRow(trx, id)
    if (!t) throw new NotFoundError('No such trip')
    if (wanted.length) {
      const ok = await trx.selectFrom('users').select('id').where('id', 'in', wanted).where('role', 'in', ['guide', 'organiser']).execute()
      const bad = wanted.filter((u) => !ok.some((o) => o.id === u))
      if (bad.length) throw new TripRuleError('userIds', `Account ${bad.join(', ')} is not a guide or organiser`)
    }
    const before = (await trx.selectFrom('trip_guides').select('user_id').where('trip_id', '=', id).execute()).map((r) => r.user_id)
    const added = wanted.filter((u) => !before.includes(u))
    const removed = before.filter((u) => !wanted.includes(u))
    if (removed.length) await trx.deleteFrom('trip_guides').where('trip_id', '=', id).where('user_id', 'in', removed).execute()
    for (const u of added) await trx.insertInto('trip_guides').values({ trip_id: id, user_id: u }).execute()
    if (added.length || removed.length) await audit(trx, { action: 'trip_guides', actorUserId: user.id, detail: { tripId: id, added, removed } })
  })
  return tripGuides(db, id)
}

/** "My trips": the trips a guide is assigned to (every trip for an organiser), with their sites for the tools. */
export async function myGuidedTrips(db: Kysely<Database>, user: User) {
  let q = db.selectFrom('trips').selectAll('trips').orderBy('trips.start_date').orderBy('trips.id')
  if (user.role !== 'organiser') q = q.innerJoin('trip_guides', 'trip_guides.trip_id', 'trips.id').where('trip_guides.user_id', '=', user.id)
  const trips = await q.execute()
  const data = []
  for (const t of trips) {
    const backups = await db.selectFrom('trip_backup_sites').innerJoin('sites', 'sites.id', 'trip_backup_sites.site_id')
      .select(['sites.id', 'sites.name']).where('trip_backup_sites.trip_id', '=', t.id).orderBy('trip_backup_sites.rank').execute()
    const primary = await db.selectFrom('sites').select(['id', 'name']).where('id', '=', t.primary_site_id).executeTakeFirstOrThrow()
    data.push({
      id: t.id, title: t.title, status: t.status, eclipseId: t.eclipse_id, startDate: t.start_date, endDate: t.end_date,
      sites: [{ ...primary, primary: true }, ...backups.map((b) => ({ ...b, primary: false }))],
    })
  }
  return { data, meta: { total: data.length } }
}

/** Trips (with travellers holding seats) that use a site, as primary or fallback. */
export async function siteImpact(db: Db, siteId: number) {
  const trips = await db.selectFrom('trips').select(['id', 'title']).where('primary_site_id', '=', siteId)
    .union(db.selectFrom('trips').innerJoin('trip_backup_sites', 'trip_backup_sites.trip_id', 'trips.id').select(['trips.id', 'trips.title']).where('trip_backup_sites.site_id', '=', siteId))
    .execute()
  const out: Array<{ tripId: number; title: string; travellers: number; seats: number }> = []
  for (const t of trips) {
    const who = await bookedTravellers(db, t.id)
    if (who.length) out.push({ tripId: t.id, title: t.title, travellers: new Set(who.map((w) => w.userId)).size, seats: who.reduce((s, w) => s + w.seats, 0) })
  }
  return out.sort((a, b) => a.tripId - b.tripId)
}

function confirmNeeded(what: string, impact: Awaited<ReturnType<typeof siteImpact>>): TripConflictError {
  const travellers = impact.reduce((s, x) => s + x.travellers, 0)
  const list = impact.map((x) => `"${x.title}" (${x.travellers} traveller${x.travellers === 1 ? '' : 's'}, ${x.seats} seat${x.seats === 1 ? '' : 's'})`).join('; ')
  return new TripConflictError('confirm_needed',
    `${what} affects ${list}. They will be e-mailed about the change. Confirm to go ahead.`,
    { trips: impact, travellers })
}

const sitePlace = (s: { name: string; lat: number; lon: number; elevation_m: number }) => `${s.name} (${s.lat.toFixed(4)}°, ${s.lon.toFixed(4)}°, ${Math.round(s.elevation_m)} m)`

/**
 * A site edit. Renaming or moving a site that a trip with bookings uses first answers 409
 * confirm_needed naming the trips and travellers; confirmed, the site changes and each traveller is
 * e-mailed the old and new place, in the same transaction. Other edits go through as before.
 */
export async function changeSite(db: Kysely<Database>, user: User, siteId: number, patch: SitePatchInput, confirm: boolean, appUrl: string) {
  const s = await getSite(db, siteId)
  const moves = (patch.name !== undefined && patch.name !== s.name) || (patch.lat !== undefined && patch.lat !== s.lat)
    || (patch.lon !== undefined && patch.lon !== s.lon) || (patch.elevationM !== undefined && patch.elevationM !== s.elevation_m)
  if (!moves) return updateSite(db, siteId, patch)
  const impact = await siteImpact(db, siteId)
  if (impact.length && !confirm) throw confirmNeeded(`Changing the site "${s.name}"`, impact)
  await db.transaction().execute(async (trx) => {
    await updateSite(trx as unknown as Kysely<Database>, siteId, patch)
    const after = await trx.selectFrom('sites').selectAll().where('id', '=', siteId).executeTakeFirstOrThrow()
    if (!impact.length) return
    const change: Change = { label: 'Observing site', from: sitePlace(s), to: sitePlace(after) }
    for (const x of impact) await tellTravellers(trx, { id: x.tripId, title: x.title }, [{ ...change, key: 'primarySiteId' }], appUrl)
    await audit(trx, { action: 'site_change_told', actorUserId: user.id, detail: { siteId, trips: impact.map((x) => x.tripId), change } })
  })
}

/**
 * Deletes a site. A trip's primary site cannot go (409 site_in_use: change the trip first). A
 * fallback site of trips with bookings first asks for confirmation; confirmed, it is dropped from
 * those trips and their travellers are told. Without confirmation a site in use stays.
 */
export async function removeSite(db: Kysely<Database>, user: User, siteId: number, confirm: boolean, appUrl: string) {
  const s = await getSite(db, siteId)
  const primaryOf = await db.selectFrom('trips').select('title').where('primary_site_id', '=', siteId).executeTakeFirst()
  if (primaryOf) throw new SiteInUseError(primaryOf.title)
  const impact = await siteImpact(db, siteId)
  if (impact.length && !confirm) throw confirmNeeded(`Deleting the site "${s.name}"`, impact)
  await db.transaction().execute(async (trx) => {
    const used = await trx.selectFrom('trips').innerJoin('trip_backup_sites', 'trip_backup_sites.trip_id', 'trips.id').select(['trips.id', 'trips.title'])
      .where('trip_backup_sites.site_id', '=', siteId).execute()
    if (used.length && !confirm) throw new SiteInUseError(used[0]!.title)
    for (const t of used) {
      await trx.deleteFrom('trip_backup_sites').where('trip_id', '=', t.id).where('site_id', '=', siteId).execute()
      await tellTravellers(trx, t, [{ label: 'Fallback sites', from: `${s.name} is a fallback site`, to: `${s.name} is no longer a fallback site`, key: 'backupSiteIds', site: s.name }], appUrl)
    }
    if (used.length) await audit(trx, { action: 'site_delete_told', actorUserId: user.id, detail: { siteId, name: s.name, trips: used.map((t) => t.id) } })
    const r = await trx.deleteFrom('sites').where('id', '=', siteId).executeTakeFirst()
    if (!r.numDeletedRows) throw new NotFoundError('No such site')
  })
}
