import { ackContext, messageSecretContext, smsContext } from './decisionContexts'
import { createHash, randomBytes, randomUUID } from 'node:crypto'
import type { Kysely, Transaction } from 'kysely'
import { localTime } from '../../shared/time/local'
import type { Database, User } from '../database/schema'
import { audit } from './audit'
import { nowIso, nowMs } from './clock'
import { decisionInForce } from './decisionState'
import * as T from './mailTemplates'
import { enqueueMail, SECRET_TOKEN } from './outbox'
import { unsealParticipantField } from './people/participantSeal'
import { NotFoundError, zoneAt } from './planning'
import { seal, unseal } from './sealed'
import { assertTimetableAccess, timetable, type Timetable } from './timetable'
import { getTripRow, lockTripRow } from './trips'

type Db = Kysely<Database> | Transaction<Database>

/** Bad input naming its field (400). */
export class DecisionRuleError extends Error {
  constructor(public field: string, message: string) { super(message) }
}
/** The decision can no longer change: C1 has begun at the site in force (or at the one asked for). 409 decision_locked. */
export class DecisionLockedError extends Error {
  constructor(message: string, public c1Utc: string) { super(message) }
}
/** An acknowledgement of a decision that a newer one replaced (409 decision_superseded). */
export class DecisionSupersededError extends Error {}

export interface DecisionInput { siteId: number; departAt: string; meetingPoint?: string | null; message?: string | null }

const hashToken = (t: string) => createHash('sha256').update(t).digest('hex')
export { messageSecretContext, smsContext }
/** Outbox rows of a decision notice carry this dedupe key prefix, so their delivery can be read per person. */
const mailKey = (recipientId: number) => `decision-ack:${recipientId}:${randomUUID()}`

/** C1 (UTC ISO) at a site of the trip's timetable, or null where the site sees no eclipse. */
function c1At(tt: Timetable, siteId: number): string | null {
  return tt.sites.find((s) => s.siteId === siteId)?.contacts.c1?.utc ?? null
}

/** Who is told: every seat of every confirmed booking (one participant per seat) and every guide of the trip. */
async function audience(db: Db, tripId: number) {
  const bookings = await db.selectFrom('bookings').innerJoin('users', 'users.id', 'bookings.user_id')
    .select(['bookings.id', 'bookings.seats', 'bookings.user_id', 'users.name', 'users.email'])
    .where('bookings.trip_id', '=', tripId).where('bookings.status', '=', 'confirmed').orderBy('bookings.id').execute()
  const parts = bookings.length
    ? await db.selectFrom('participants').select(['booking_id', 'seat', 'full_name', 'mobile_phone_sealed', 'erased_at'])
      .where('booking_id', 'in', bookings.map((b) => b.id)).execute()
    : []
  const people: Array<{ kind: 'participant' | 'guide'; bookingId: number | null; seat: number | null; userId: number; name: string; email: string; holderName: string; phone: string | null }> = []
  for (const b of bookings) {
    for (let seat = 1; seat <= b.seats; seat++) {
      const p = parts.find((x) => x.booking_id === b.id && x.seat === seat)
      let phone: string | null = null
      if (p && !p.erased_at) {
        // A number that no longer opens (its key is gone) is treated as missing: e-mail still goes.
        try { phone = unsealParticipantField(b.id, seat, 'mobilePhone', p.mobile_phone_sealed) } catch { phone = null }
      }
      const name = p?.full_name || (seat === 1 ? b.name : `${b.name} — seat ${seat}`)
      people.push({ kind: 'participant', bookingId: b.id, seat, userId: b.user_id, name, email: b.email, holderName: b.name, phone })
    }
  }
  const guides = await db.selectFrom('trip_guides').innerJoin('users', 'users.id', 'trip_guides.user_id')
    .select(['users.id', 'users.name', 'users.email']).where('trip_guides.trip_id', '=', tripId).orderBy('users.id').execute()
  for (const g of guides) people.push({ kind: 'guide', bookingId: null, seat: null, userId: g.id, name: g.name, email: g.email, holderName: g.name, phone: null })
  return people
}

interface NoticeContext {
  tripId: number; tripTitle: string; siteName: string; departAt: string; departLocal: string; meetingPoint: string; message: string | null
  kind: Timetable['sites'][number]['kind']; appUrl: string
}

/**
 * Queues one person's notice on every channel they have: e-mail (through the outbox), SMS to a
 * participant's own mobile number, and a push to each device of the account that opted in (the
 * booking holder's seat and guides; other seats of a booking would only repeat it on the same phone).
 * Every message carries the same acknowledgement link, its token sealed beside a placeholder.
 */
async function queueNotice(trx: Transaction<Database>, ctx: NoticeContext, r: { id: number; kind: 'participant' | 'guide'; seat: number | null; userId: number | null; name: string; email: string | null; holderName: string; phone: string | null }, token: string) {
  const ackUrl = `${ctx.appUrl}/ack/${SECRET_TOKEN}`
  const forName = r.kind === 'participant' && r.seat !== 1 ? r.name : undefined
  // Every channel speaks the account's language (a participant's notice goes in the booking holder's).
  const locale = r.userId ? (await trx.selectFrom('users').select('locale').where('id', '=', r.userId).executeTakeFirst())?.locale : undefined
  if (r.email) {
    const mail = T.decisionMail({
      name: r.holderName, forName, tripTitle: ctx.tripTitle, siteName: ctx.siteName, departLocal: ctx.departLocal, departUtc: ctx.departAt.slice(11, 16),
      meetingPoint: ctx.meetingPoint, message: ctx.message, ackUrl, eclipseKind: ctx.kind, locale,
    })
    await enqueueMail(trx, { kind: 'decision', to: { email: r.email, name: r.holderName }, locale, tripId: ctx.tripId, dedupeKey: mailKey(r.id), secret: token, ...mail })
  }
  const short = T.decisionShortTexts({ tripTitle: ctx.tripTitle, siteName: ctx.siteName, meetingPoint: ctx.meetingPoint, departLocal: ctx.departLocal, ackUrl, locale })
  const text = short.sms
  const queue = async (channel: 'sms' | 'push', body: string, extra: { to?: string; subscriptionId?: number }) => {
    const messageId = randomUUID()
    await trx.insertInto('decision_messages').values({
      message_id: messageId, recipient_id: r.id, channel, to_sealed: extra.to ? seal(extra.to, smsContext(messageId)) : null,
      push_subscription_id: extra.subscriptionId ?? null, body, sealed_secret: seal(token, messageSecretContext(messageId)), next_attempt_at: nowIso(),
    }).execute()
  }
  if (r.phone) await queue('sms', text, { to: r.phone })
  if (r.userId && (r.kind === 'guide' || r.seat === 1)) {
    const subs = await trx.selectFrom('push_subscriptions').select('id').where('user_id', '=', r.userId).where('gone_at', 'is', null).execute()
    const payload = JSON.stringify({ title: short.pushTitle, body: short.pushBody, url: ackUrl })
    for (const s of subs) await queue('push', payload, { subscriptionId: s.id })
  }
}

/**
 * Drops what is still queued for older decisions of the trip (called before the new notices are
 * queued, so every queued decision mail of the trip is an older one): nobody should get a replaced site.
 */
async function withdrawOlder(trx: Transaction<Database>, tripId: number, keepDecisionId: number) {
  const older = trx.selectFrom('decision_recipients').innerJoin('trip_decisions', 'trip_decisions.id', 'decision_recipients.decision_id')
    .select('decision_recipients.id').where('trip_decisions.trip_id', '=', tripId).where('trip_decisions.id', '!=', keepDecisionId)
  await trx.updateTable('decision_messages').set({ status: 'failed', last_error: 'Replaced by a newer decision', sealed_secret: null, sending_since: null })
    .where('recipient_id', 'in', older).where('status', '=', 'queued').execute()
  await trx.updateTable('decision_recipients').set({ token_sealed: null }).where('id', 'in', older).execute()
  await trx.updateTable('outbox').set({ status: 'failed', last_error: 'Replaced by a newer decision', sealed_secret: null })
    .where('trip_id', '=', tripId).where('kind', '=', 'decision').where('status', '=', 'queued').execute()
}

/**
 * Records the day's decision for a trip (organisers), tells every confirmed participant and guide,
 * and audits it. It may change again until C1 at the site in force (and at the site asked for).
 */
export async function decide(db: Kysely<Database>, user: User, tripId: number, input: DecisionInput, appUrl: string, ip: string | null) {
  const trip = await getTripRow(db, tripId)
  const tt = await timetable(db, tripId)
  const site = tt.sites.find((s) => s.siteId === input.siteId)
  if (!site) throw new DecisionRuleError('siteId', `Site ${input.siteId} is not one of this trip's sites (its primary site or a fallback)`)
  const current = tt.decision
  for (const sid of [current?.siteId, input.siteId]) {
    if (sid === undefined) continue
    const c1 = c1At(tt, sid)
    if (c1 && nowMs() >= Date.parse(c1)) {
      const name = tt.sites.find((s) => s.siteId === sid)!.name
      throw new DecisionLockedError(`C1 has begun at ${name} (${c1.slice(0, 19)}Z): the day's decision can no longer change`, c1)
    }
  }
  const departAt = new Date(input.departAt).toISOString()
  const meetingPoint = input.meetingPoint?.trim() || trip.meeting_name
  const message = input.message?.trim() || null
  const ctx: NoticeContext = {
    tripId, tripTitle: trip.title, siteName: site.name, departAt, departLocal: localTime(Date.parse(departAt), zoneAt(site.lat, site.lon)).local,
    meetingPoint, message, kind: site.kind, appUrl,
  }
  const result = await db.transaction().execute(async (trx) => {
    // One decision at a time per trip (the same row lock that seat changes take).
    await lockTripRow(trx, tripId)
    const people = await audience(trx, tripId)
    const d = await trx.insertInto('trip_decisions').values({
      trip_id: tripId, site_id: input.siteId, depart_at: departAt, meeting_point: input.meetingPoint?.trim() || null, message, decided_by: user.id, decided_at: nowIso(),
    }).returning('id').executeTakeFirstOrThrow()
    await withdrawOlder(trx, tripId, d.id)
    for (const p of people) {
      const token = randomBytes(32).toString('base64url')
      const r = await trx.insertInto('decision_recipients').values({
        decision_id: d.id, kind: p.kind, booking_id: p.bookingId, seat: p.seat, user_id: p.userId, name: p.name, token_hash: hashToken(token),
      }).returning('id').executeTakeFirstOrThrow()
      await trx.updateTable('decision_recipients').set({ token_sealed: seal(token, ackContext(r.id)) }).where('id', '=', r.id).execute()
      await queueNotice(trx, ctx, { id: r.id, ...p }, token)
    }
    await audit(trx, {
      action: current ? 'decision_change' : 'decision_make', actorUserId: user.id, ip,
      detail: { tripId, decisionId: d.id, siteId: input.siteId, departAt, meetingPoint, previousSiteId: current?.siteId ?? null, recipients: people.length },
    })
    return { id: d.id, recipients: people.length }
  })
  return result
}

/** Sends the decision in force again to those who have not acknowledged it (organisers), on every channel. */
export async function resendUnacknowledged(db: Kysely<Database>, user: User, tripId: number, appUrl: string, ip: string | null) {
  const trip = await getTripRow(db, tripId)
  const tt = await timetable(db, tripId)
  const d = tt.decision
  if (!d) throw new NotFoundError('No decision has been made for this trip yet')
  const site = tt.sites[0]!
  const ctx: NoticeContext = {
    tripId, tripTitle: trip.title, siteName: site.name, departAt: d.departAt, departLocal: d.departLocal, meetingPoint: d.meetingPoint, message: d.message, kind: site.kind, appUrl,
  }
  return db.transaction().execute(async (trx) => {
    const rows = await trx.selectFrom('decision_recipients').selectAll().where('decision_id', '=', d.id).where('acknowledged_at', 'is', null).orderBy('id').execute()
    const people = await audience(trx, tripId)
    let resent = 0
    for (const r of rows) {
      if (!r.token_sealed) continue
      const token = unseal(r.token_sealed, ackContext(r.id))
      // Addresses and numbers as they are now (a phone added since the decision counts).
      const p = people.find((x) => (r.kind === 'guide' ? x.kind === 'guide' && x.userId === r.user_id : x.bookingId === r.booking_id && x.seat === r.seat))
      const email = p?.email ?? (r.user_id ? (await trx.selectFrom('users').select('email').where('id', '=', r.user_id).executeTakeFirst())?.email ?? null : null)
      await queueNotice(trx, ctx, { id: r.id, kind: r.kind, seat: r.seat, userId: r.user_id, name: r.name, email, holderName: p?.holderName ?? r.name, phone: p?.phone ?? null }, token)
      resent++
    }
    await audit(trx, { action: 'decision_resend', actorUserId: user.id, ip, detail: { tripId, decisionId: d.id, recipients: resent } })
    return { resent }
  })
}

type Delivery = 'sent' | 'pending' | 'failed' | null
const stateOf = (statuses: string[]): Delivery => {
  if (!statuses.length) return null
  if (statuses.includes('sent')) return 'sent'
  if (statuses.some((s) => s === 'queued' || s === 'sending')) return 'pending'
  return 'failed'
}

/** The decision board: the decision in force, its history, and per person what reached them and whether they acknowledged. */
export async function decisionBoard(db: Kysely<Database>, user: User, tripId: number) {
  await assertTimetableAccess(db, user, tripId)
  const tt = await timetable(db, tripId)
  const history = await db.selectFrom('trip_decisions').leftJoin('users', 'users.id', 'trip_decisions.decided_by').leftJoin('sites', 'sites.id', 'trip_decisions.site_id')
    .select(['trip_decisions.id', 'trip_decisions.site_id', 'trip_decisions.depart_at', 'trip_decisions.meeting_point', 'trip_decisions.message', 'trip_decisions.decided_at', 'users.name as decided_by_name', 'sites.name as site_name'])
    .where('trip_decisions.trip_id', '=', tripId).orderBy('trip_decisions.id', 'desc').execute()
  const current = tt.decision
  let recipients: Array<{ id: number; kind: 'participant' | 'guide'; name: string; bookingId: number | null; seat: number | null; delivered: { email: Delivery; sms: Delivery; push: Delivery }; acknowledgedAt: string | null }> = []
  if (current) {
    const rows = await db.selectFrom('decision_recipients').select(['id', 'kind', 'name', 'booking_id', 'seat', 'acknowledged_at']).where('decision_id', '=', current.id).orderBy('id').execute()
    const msgs = rows.length ? await db.selectFrom('decision_messages').select(['recipient_id', 'channel', 'status']).where('recipient_id', 'in', rows.map((r) => r.id)).execute() : []
    const mails = await db.selectFrom('outbox').select(['dedupe_key', 'status']).where('trip_id', '=', tripId).where('kind', '=', 'decision').execute()
    const mailsOf = new Map<number, string[]>()
    for (const m of mails) {
      const rid = Number(/^decision-ack:(\d+):/.exec(m.dedupe_key ?? '')?.[1])
      if (rid) mailsOf.set(rid, [...(mailsOf.get(rid) ?? []), m.status])
    }
    recipients = rows.map((r) => ({
      id: r.id, kind: r.kind, name: r.name, bookingId: r.booking_id, seat: r.seat, acknowledgedAt: r.acknowledged_at,
      delivered: {
        email: stateOf(mailsOf.get(r.id) ?? []),
        sms: stateOf(msgs.filter((m) => m.recipient_id === r.id && m.channel === 'sms').map((m) => m.status)),
        push: stateOf(msgs.filter((m) => m.recipient_id === r.id && m.channel === 'push').map((m) => m.status)),
      },
    }))
  }
  const lockSite = current?.siteId
  const c1 = lockSite !== undefined ? c1At(tt, lockSite) : null
  return {
    trip: { id: tt.trip.id, title: tt.trip.title },
    sites: tt.sites.map((s) => ({ id: s.siteId, name: s.name, role: s.role, zone: s.zone, c1Utc: s.contacts.c1?.utc ?? null })),
    current: current ? { ...current, c1Utc: c1, locked: !!c1 && nowMs() >= Date.parse(c1) } : null,
    history: history.map((h) => ({
      id: h.id, siteId: h.site_id, siteName: h.site_name, departAt: h.depart_at, meetingPoint: h.meeting_point, message: h.message, decidedAt: h.decided_at,
      decidedBy: h.decided_by_name, inForce: h.id === current?.id,
    })),
    recipients,
    meta: { recipients: recipients.length, acknowledged: recipients.filter((r) => r.acknowledgedAt).length },
  }
}

async function recipientByToken(db: Db, token: string) {
  const r = await db.selectFrom('decision_recipients').innerJoin('trip_decisions', 'trip_decisions.id', 'decision_recipients.decision_id')
    .select(['decision_recipients.id', 'decision_recipients.name', 'decision_recipients.acknowledged_at', 'decision_recipients.kind', 'trip_decisions.id as decision_id', 'trip_decisions.trip_id'])
    .where('decision_recipients.token_hash', '=', hashToken(token)).executeTakeFirst()
  if (!r) throw new NotFoundError('This link is not known')
  return r
}

/**
 * What an acknowledgement link shows, without signing in: the decision it was sent for (and whether
 * a newer one replaced it). Reading records nothing: mail scanners open links too.
 */
export async function ackView(db: Kysely<Database>, token: string) {
  const r = await recipientByToken(db, token)
  const d = await db.selectFrom('trip_decisions').innerJoin('trips', 'trips.id', 'trip_decisions.trip_id').innerJoin('sites', 'sites.id', 'trip_decisions.site_id')
    .select(['trip_decisions.depart_at', 'trip_decisions.meeting_point', 'trip_decisions.message', 'trip_decisions.decided_at', 'trips.title', 'trips.meeting_name', 'sites.name as site_name', 'sites.lat', 'sites.lon'])
    .where('trip_decisions.id', '=', r.decision_id).executeTakeFirstOrThrow()
  const inForce = await decisionInForce(db, r.trip_id)
  const zone = zoneAt(d.lat, d.lon)
  const depart = localTime(Date.parse(d.depart_at), zone)
  return {
    name: r.name, tripTitle: d.title, site: { name: d.site_name, lat: d.lat, lon: d.lon, zone },
    departAt: d.depart_at, departLocal: depart.local, utcOffset: depart.utcOffset, meetingPoint: d.meeting_point ?? d.meeting_name, message: d.message, decidedAt: d.decided_at,
    acknowledgedAt: r.acknowledged_at, superseded: inForce?.id !== r.decision_id,
  }
}

/** Records that the person behind a link has seen the decision; once (a second press changes nothing). */
export async function acknowledge(db: Kysely<Database>, token: string, ip: string | null) {
  return db.transaction().execute(async (trx) => {
    const r = await recipientByToken(trx, token)
    if (r.acknowledged_at) return { acknowledgedAt: r.acknowledged_at, already: true }
    const inForce = await decisionInForce(trx, r.trip_id)
    if (inForce?.id !== r.decision_id) throw new DecisionSupersededError('A newer decision replaced this one: look for the latest message')
    const at = nowIso()
    const u = await trx.updateTable('decision_recipients').set({ acknowledged_at: at, token_sealed: null }).where('id', '=', r.id).where('acknowledged_at', 'is', null).executeTakeFirst()
    if (!u.numUpdatedRows) {
      const again = await recipientByToken(trx, token)
      return { acknowledgedAt: again.acknowledged_at!, already: true }
    }
    await audit(trx, { action: 'decision_ack', ip, detail: { tripId: r.trip_id, decisionId: r.decision_id, recipientId: r.id, kind: r.kind } })
    return { acknowledgedAt: at, already: false }
  })
}

