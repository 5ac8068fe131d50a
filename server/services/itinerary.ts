import type { Kysely } from 'kysely'
import type { EventAttributes } from 'ics'
import { localAndUtcLine, localTime, utcClock } from '../../shared/time/local'
import type { Database, User } from '../database/schema'
import { audit } from './audit'
import { dueOf } from './dues'
import { contactEvents, departureEvent, toIcs } from './calendar'
import { checklistOf } from './briefing'
import * as T from './mailTemplates'
import { enqueueMail, type OutgoingMail } from './outbox'
import { zoneAt } from './planning'
import { timetable } from './timetable'
import { getTripRow } from './trips'
import { phaseWords } from '../../shared/safety/text'
import { translator } from '../../shared/i18n/translate'


/** One itinerary e-mail per confirmed participant, with an ICS of the meeting and the contacts. */
export async function itineraryMails(db: Kysely<Database>, tripId: number, appUrl: string): Promise<OutgoingMail[]> {
  const trip = await getTripRow(db, tripId)
  const t = await timetable(db, tripId)
  const site = t.sites[0]!
  const organiser = trip.created_by ? await db.selectFrom('users').select(['name', 'email']).where('id', '=', trip.created_by).executeTakeFirst() : undefined
  const meetZone = zoneAt(trip.meeting_lat, trip.meeting_lon)
  const meet = localTime(Date.parse(trip.meeting_time_utc), meetZone)
  /** The calendar file in the recipient's language (one per language, built once). */
  const icsByLocale = new Map<string, string>()
  const icsFor = (locale: string) => {
    if (!icsByLocale.has(locale)) {
      const tr = translator(locale)
      const meetingEvent: EventAttributes = {
        uid: `umbrafield-trip${trip.id}-meeting@umbrafield`, title: tr('doc.ics.meetTitle', { place: trip.meeting_name }), start: Date.parse(trip.meeting_time_utc),
        startInputType: 'utc', startOutputType: 'utc', duration: { minutes: 30 }, location: trip.meeting_name, geo: { lat: trip.meeting_lat, lon: trip.meeting_lon },
        description: tr('doc.ics.meetDescription', { trip: trip.title, time: meet.local, zone: meetZone }),
      }
      icsByLocale.set(locale, toIcs([meetingEvent, ...(decision ? [departureEvent(trip, decision, locale)] : []), ...contactEvents({ id: trip.id, title: trip.title, eclipseId: trip.eclipse_id }, site, false, locale)], locale))
    }
    return icsByLocale.get(locale)!
  }
  const decision = t.decision
  const rows = await db.selectFrom('bookings').innerJoin('users', 'users.id', 'bookings.user_id').selectAll('bookings').select(['users.name as uname', 'users.email as uemail', 'users.locale as ulocale'])
    .where('bookings.trip_id', '=', tripId).where('bookings.status', '=', 'confirmed').orderBy('bookings.id').execute()
  return rows.map((b) => {
    const locale = b.ulocale
    const words = phaseWords(site.kind, locale)
    const mail = T.itinerary({
      name: b.uname, tripTitle: trip.title, seats: b.seats, currency: b.currency, priceMinor: b.price_minor, paidMinor: b.paid_minor, dueMinor: dueOf(b),
      bookingUrl: `${appUrl}/bookings/${b.id}`,
      meeting: { name: trip.meeting_name, local: meet.local, utcOffset: meet.utcOffset, zone: meetZone },
      site: { name: site.name, lat: site.lat, lon: site.lon, mapUrl: `${appUrl}/trips/${trip.id}`, zone: site.zone },
      contacts: (['c1', 'c2', 'max', 'c3', 'c4'] as const).filter((k) => site.contacts[k]).map((k) => ({ label: words.contact[k], local: site.contacts[k]!.local.slice(11), utc: utcClock(site.contacts[k]!.utc) })),
      eclipseKind: site.kind, centralName: words.central ? words.central[0]!.toLocaleUpperCase(locale) + words.central.slice(1) : null,
      durationSec: site.durationSec, timeLine: localAndUtcLine(site.time.line, site, locale), bring: checklistOf(trip.briefing_checklist), briefingUrl: `${appUrl}/trips/${trip.id}/briefing`,
      organiser: organiser ?? { name: translator(locale)('mail.organiserFallback'), email: 'trips@umbrafield.test' },
      locale,
    })
    return { kind: 'itinerary', to: { email: b.uemail, name: b.uname }, bookingId: b.id, tripId, locale, attachments: [{ filename: 'eclipse-itinerary.ics', content: icsFor(locale), contentType: 'text/calendar; charset=utf-8; method=PUBLISH' }], ...mail }
  })
}

export async function itineraryPreview(db: Kysely<Database>, tripId: number, appUrl: string) {
  const mails = await itineraryMails(db, tripId, appUrl)
  const first = mails[0]
  return { recipients: mails.length, to: mails.map((m) => m.to.email), preview: first ? { subject: first.subject, html: first.html, text: first.text } : null }
}

/** Queues the itinerary for every confirmed participant in one transaction. */
export async function sendItinerary(db: Kysely<Database>, user: User, tripId: number, appUrl: string) {
  const mails = await itineraryMails(db, tripId, appUrl)
  await db.transaction().execute(async (trx) => {
    for (const m of mails) await enqueueMail(trx, m)
    await audit(trx, { action: 'itinerary_send', actorUserId: user.id, detail: { tripId, recipients: mails.length } })
  })
  return { queued: mails.length }
}
