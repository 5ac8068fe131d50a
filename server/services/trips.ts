import type { Kysely, Selectable, Transaction } from 'kysely'
import { ensureSeatCounter } from './seatCounter'
import { isPostgres } from '../database/dialect'
import { localTime } from '../../shared/time/local'
import { localKindOf, phaseWords } from '../../shared/safety/text'
import type { CancellationTierInput, TripCreateInput } from '../../shared/schemas/trips'
import type { Database, TripsTable, User } from '../database/schema'
import { localReport } from '../eclipse/report'
import { audit } from './audit'
import { elementsInForce } from './eclipses'
import { getSite, NotFoundError, zoneAt } from './planning'
import { assertSiteNamesChosen } from './planningDetails'
import { nowIso } from './clock'

export type TripRow = Selectable<TripsTable>
export class TripRuleError extends Error {
  constructor(public field: string, message: string) { super(message) }
}
/** A guide asking for a trip they are not assigned to: told so plainly (403), not that the trip is missing. */
export class NotAssignedError extends Error {
  constructor() { super('You are not assigned to this trip. Ask the organiser to add you to its guides.') }
}
/** A conflict the caller can act on, with a code for the page: sales_closed, has_bookings, confirm_needed. */
export class TripConflictError extends Error {
  constructor(public code: string, message: string, public data: Record<string, unknown> = {}) { super(message) }
}

/** Organisers reach every trip; a guide only those assigned to them (otherwise NotAssignedError). */
export async function assertStaffReach(db: Kysely<Database>, user: User, trip: TripRow): Promise<boolean> {
  if (user.role === 'organiser') return true
  if (user.role !== 'guide') return false
  if (await isTripGuide(db, trip.id, user.id)) return true
  throw new NotAssignedError()
}

export async function createTrip(db: Kysely<Database>, user: User, t: TripCreateInput): Promise<{ id: number }> {
  const ws = await db.selectFrom('workspaces').selectAll().where('id', '=', t.workspaceId).executeTakeFirst()
  if (!ws) throw new TripRuleError('workspaceId', 'No such planning workspace')
  const siteIds = [t.primarySiteId, ...t.backupSiteIds]
  const sites = await db.selectFrom('sites').select(['id', 'workspace_id']).where('id', 'in', siteIds).execute()
  for (const id of siteIds) {
    const s = sites.find((x) => x.id === id)
    if (!s || s.workspace_id !== ws.id) throw new TripRuleError(id === t.primarySiteId ? 'primarySiteId' : 'backupSiteIds', `Site ${id} is not in this workspace`)
  }
  if (t.guideIds.length) {
    const guides = await db.selectFrom('users').select('id').where('id', 'in', t.guideIds).where('role', 'in', ['guide', 'organiser']).execute()
    if (guides.length !== new Set(t.guideIds).size) throw new TripRuleError('guideIds', 'Every guide must be a guide or organiser account')
  }
  return db.transaction().execute(async (trx) => {
    const trip = await trx.insertInto('trips').values({
      workspace_id: ws.id, eclipse_id: ws.eclipse_id, primary_site_id: t.primarySiteId, title: t.title, description: t.description,
      start_date: t.startDate, end_date: t.endDate, meeting_name: t.meetingPoint.name, meeting_lat: t.meetingPoint.lat, meeting_lon: t.meetingPoint.lon,
      meeting_time_utc: new Date(t.meetingPoint.time).toISOString(), seats: t.seats, price_minor: t.priceMinor, deposit_minor: t.depositMinor,
      currency: t.currency, balance_due_date: t.balanceDueDate, cancellation_tiers: JSON.stringify(t.cancellationTiers),
      min_group_size: t.minGroupSize, created_by: user.id,
    }).returning('id').executeTakeFirstOrThrow()
    for (const [rank, siteId] of t.backupSiteIds.entries()) await trx.insertInto('trip_backup_sites').values({ trip_id: trip.id, site_id: siteId, rank }).execute()
    for (const g of new Set(t.guideIds)) await trx.insertInto('trip_guides').values({ trip_id: trip.id, user_id: g }).execute()
    await audit(trx, { action: 'trip_create', actorUserId: user.id, detail: { tripId: trip.id } })
    return { id: trip.id }
  })
}

/**
 * The trip row, locked for the rest of the caller's transaction, so that seat counts read after it
 * cannot change underneath: every transaction that hands out or frees seats of a trip takes this
 * first. PostgreSQL: SELECT … FOR UPDATE, a row lock held until commit (other instances wait).
 * SQLite: a plain read; the transaction began with BEGIN IMMEDIATE and so already holds the
 * database's one write lock.
 */
export async function lockTripRow(trx: Transaction<Database>, id: number): Promise<TripRow | undefined> {
  const q = trx.selectFrom('trips').selectAll().where('id', '=', id)
  return (isPostgres(trx) ? q.forUpdate() : q).executeTakeFirst()
}

export async function getTripRow(db: Kysely<Database>, id: number): Promise<TripRow> {
  const t = await db.selectFrom('trips').selectAll().where('id', '=', id).executeTakeFirst()
  if (!t) throw new NotFoundError('No such trip')
  return t
}

/** A trip the caller may see: published ones for everyone, drafts for organisers only. */
export async function visibleTrip(db: Kysely<Database>, user: User | null, id: number): Promise<TripRow> {
  const t = await getTripRow(db, id)
  // Drafts: organisers, and the guides already assigned to them.
  if (t.status !== 'published' && user?.role !== 'organiser' && !(user?.role === 'guide' && (await isTripGuide(db, id, user.id)))) throw new NotFoundError('No such trip')
  return t
}

export async function publishTrip(db: Kysely<Database>, user: User, id: number) {
  await getTripRow(db, id)
  await assertSiteNamesChosen(db, id)
  await db.transaction().execute(async (trx) => {
    await trx.updateTable('trips').set({ status: 'published' }).where('id', '=', id).execute()
    // Its seat counter, before the first hold asks for it (a rush of first holds need not each make it).
    await ensureSeatCounter(trx, id)
    await audit(trx, { action: 'trip_publish', actorUserId: user.id, detail: { tripId: id } })
  })
  return { id, status: 'published' as const }
}

/** Seats held (and not lapsed) or confirmed, and seats reserved by live waitlist offers. */
export async function seatUse(db: Kysely<Database>, tripId: number, atIso = nowIso(), exceptUserId?: number) {
  const taken = await db.selectFrom('bookings').select((eb) => eb.fn.coalesce(eb.fn.sum<number>('seats'), eb.val(0)).as('n'))
    .where('trip_id', '=', tripId)
    .where((eb) => eb.or([eb('status', '=', 'confirmed'), eb.and([eb('status', '=', 'held'), eb('hold_expires_at', '>', atIso)])]))
    .executeTakeFirstOrThrow()
  let offers = db.selectFrom('waitlist').select((eb) => eb.fn.coalesce(eb.fn.sum<number>('seats'), eb.val(0)).as('n'))
    .where('trip_id', '=', tripId).where('status', '=', 'offered').where('offer_expires_at', '>', atIso)
  if (exceptUserId) offers = offers.where('user_id', '!=', exceptUserId)
  const offered = await offers.executeTakeFirstOrThrow()
  return { taken: Number(taken.n), offered: Number(offered.n) }
}

export function tiersOf(t: TripRow): CancellationTierInput[] {
  return JSON.parse(t.cancellation_tiers) as CancellationTierInput[]
}

export async function tripSummary(db: Kysely<Database>, t: TripRow) {
  const use = await seatUse(db, t.id)
  const site = await db.selectFrom('sites').select(['id', 'name', 'lat', 'lon', 'elevation_m']).where('id', '=', t.primary_site_id).executeTakeFirstOrThrow()
  return {
    id: t.id, title: t.title, description: t.description, status: t.status, eclipseId: t.eclipse_id, workspaceId: t.workspace_id,
    startDate: t.start_date, endDate: t.end_date, seats: t.seats, seatsLeft: Math.max(0, t.seats - use.taken - use.offered),
    priceMinor: t.price_minor, depositMinor: t.deposit_minor, currency: t.currency, balanceDueDate: t.balance_due_date,
    cancellationTiers: tiersOf(t), minGroupSize: t.min_group_size, salesOpen: t.sales_open === 1,
    meetingPoint: { name: t.meeting_name, lat: t.meeting_lat, lon: t.meeting_lon, timeUtc: t.meeting_time_utc, ...localTime(Date.parse(t.meeting_time_utc), zoneAt(t.meeting_lat, t.meeting_lon)) },
    site: { id: site.id, name: site.name, lat: site.lat, lon: site.lon, elevationM: site.elevation_m },
  }
}

export async function listTrips(db: Kysely<Database>, user: User | null) {
  let q = db.selectFrom('trips').selectAll().orderBy('start_date')
  if (user?.role !== 'organiser') q = q.where('status', '=', 'published')
  const rows = await q.execute()
  return Promise.all(rows.map((t) => tripSummary(db, t)))
}

/** The public trip page: summary plus the site's contacts in local time from the engine. */
export async function tripDetail(db: Kysely<Database>, t: TripRow) {
  const summary = await tripSummary(db, t)
  const site = await getSite(db, t.primary_site_id)
  const { el, deltaTOverride } = await elementsInForce(db, t.eclipse_id)
  const r = localReport(t.eclipse_id, el, { latDeg: site.lat, lonDeg: site.lon, elevationM: site.elevation_m }, deltaTOverride)
  const zone = zoneAt(site.lat, site.lon)
  const contacts = (['c1', 'c2', 'max', 'c3', 'c4'] as const).filter((k) => r[k]).map((k) => ({
    name: k, utc: r[k]!.utc, ...localTime(Date.parse(r[k]!.utc), zone), altitudeDeg: r[k]!.apparentAltitudeDeg, uncertaintySec: r[k]!.uncertaintySec,
  }))
  const kind = localKindOf(r.type)
  return {
    ...summary,
    eclipse: { type: r.type, kind, words: phaseWords(kind), durationSec: r.durationSec, magnitude: r.magnitude, zone, contacts, deltaTSec: r.deltaTSec, time: r.time, elementsSource: r.elementsSource },
  }
}

export async function isTripGuide(db: Kysely<Database>, tripId: number, userId: number): Promise<boolean> {
  return !!(await db.selectFrom('trip_guides').select('user_id').where('trip_id', '=', tripId).where('user_id', '=', userId).executeTakeFirst())
}
