import type { Kysely } from 'kysely'
import { briefingSequence } from '../../shared/briefing/sequence'
import { coronaOn } from '../../shared/briefing/solarCycle'
import { compassWords } from '../../shared/safety/cues'
import { phaseWords, safetyLines } from '../../shared/safety/text'
import { DEFAULT_CHECKLIST } from '../../shared/schemas/trips'
import type { Database, User } from '../database/schema'
import { elementsInForce } from './eclipses'
import { skyAt } from '../eclipse/sky'
import { clockDirection, localReport } from '../eclipse/report'
import { audit } from './audit'
import { NotFoundError, siteWithMetrics } from './planning'
import { cueInputFor, timetable, type Timetable } from './timetable'
import { assertStaffReach, getTripRow } from './trips'
import { nowIso } from './clock'

/**
 * Who may read a trip's briefing: organisers, the trip's guides, and travellers with a confirmed
 * booking on it (a hold alone, paid nothing, does not open the meeting point and the plan). Anyone else gets the same 404 as for a trip that does not exist.
 */
export async function assertBriefingAccess(db: Kysely<Database>, user: User, tripId: number) {
  const trip = await getTripRow(db, tripId)
  const booked = await db.selectFrom('bookings').select('id').where('trip_id', '=', tripId).where('user_id', '=', user.id)
    .where('status', '=', 'confirmed').executeTakeFirst()
  // A confirmed seat opens the briefing whatever the account's role (a guide of other trips may travel on this one).
  if (trip.status === 'published' && booked) return trip
  if (await assertStaffReach(db, user, trip)) return trip
  throw new NotFoundError('No such trip')
}

export function checklistOf(raw: string | null): string[] {
  if (!raw) return [...DEFAULT_CHECKLIST]
  try {
    const v = JSON.parse(raw)
    return Array.isArray(v) && v.every((x) => typeof x === 'string') ? v : [...DEFAULT_CHECKLIST]
  } catch { return [...DEFAULT_CHECKLIST] }
}

/**
 * The briefing for one site of a trip (the primary site unless `siteId` names one of its sites).
 * `tt` is the trip's timetable when the caller has it already (the PDF builds one briefing per site).
 */
export async function briefing(db: Kysely<Database>, tripId: number, siteId?: number, tt?: Timetable) {
  tt ??= await timetable(db, tripId)
  const trip = await getTripRow(db, tripId)
  const site = siteId === undefined ? tt.sites[0] : tt.sites.find((s) => s.siteId === siteId)
  if (!site) throw new NotFoundError('No such site on this trip')
  const { el, deltaTOverride } = await elementsInForce(db, trip.eclipse_id)
  const report = localReport(trip.eclipse_id, el, { latDeg: site.lat, lonDeg: site.lon, elevationM: site.elevationM }, deltaTOverride)
  const maxUtc = site.contacts.max?.utc ?? site.contacts.c1?.utc
  const sky = maxUtc ? skyAt(Date.parse(maxUtc), site.lat, site.lon) : []
  const corona = coronaOn(trip.eclipse_id)
  const cueInput = cueInputFor(el, report, trip, tt.trip.cueOffsets, site.planets)
  const seq = briefingSequence({
    kind: site.kind, zone: site.zone, durationSec: site.durationSec, cueInput, sky,
    coronaShape: site.kind === 'total' ? corona?.shape : undefined,
    contacts: Object.fromEntries(Object.entries(site.contacts).filter(([, c]) => c).map(([k, c]) => [k, { utc: c!.utc, altitudeDeg: c!.altitudeDeg, azimuthDeg: c!.azimuthDeg, direction: c!.direction }])),
  })
  const metrics = (await siteWithMetrics(db, site.siteId)).metrics
  const sun = (['c1', 'c2', 'max', 'c3', 'c4'] as const).flatMap((k) => {
    const c = site.contacts[k]
    return c ? [{ contact: k, label: phaseWords(site.kind).contact[k], altitudeDeg: Math.round(c.altitudeDeg * 10) / 10, azimuthDeg: Math.round(c.azimuthDeg * 10) / 10, direction: compassWords(c.azimuthDeg) }] : []
  })
  return {
    trip: { id: trip.id, title: trip.title, eclipseId: trip.eclipse_id },
    site: { id: site.siteId, name: site.name, role: site.role, lat: site.lat, lon: site.lon, elevationM: site.elevationM, zone: site.zone, utcOffset: site.utcOffset },
    sites: tt.sites.map((s) => ({ id: s.siteId, name: s.name, role: s.role, chosen: s.chosen })),
    /** The day's decision in force (its site is listed first and is the default), or null. */
    decision: tt.decision,
    kind: site.kind, words: site.words, durationSec: site.durationSec, magnitude: site.magnitude,
    steps: seq.steps, notice: seq.notice,
    /** What the step texts are built from, for pages that say them in another language: each contact's clock position on the Sun's disc and the shadow's compass direction (English words, as the cue rule has them). */
    stepFacts: {
      clock: Object.fromEntries((['c1', 'c2', 'c3'] as const).flatMap((k) => { const v = site.contacts[k]?.vertexAngleDeg; return v === undefined || !site.contacts[k]?.direction ? [] : [[k, clockDirection(v).clock]] })) as Partial<Record<'c1' | 'c2' | 'c3', number>>,
      shadowFrom: cueInput.shadowFrom ?? null,
    },
    sky: {
      sun,
      objects: seq.visible.map((o) => ({ ...o, altitudeDeg: Math.round(o.altitudeDeg), azimuthDeg: Math.round(o.azimuthDeg), direction: compassWords(o.azimuthDeg) })),
      /** Seen only in the dark of totality; at annular and partial sites the sky stays bright. */
      darkSky: site.kind === 'total' && !!seq.plan.window,
    },
    corona: site.kind === 'total' && corona ? { ...corona, source: corona.nearest.source } : null,
    weather: {
      cloudPct: metrics.cloudPct, pClear: metrics.pClear, source: metrics.cloudSource, note: metrics.cloudNote, method: metrics.pClearMethod,
      words: metrics.pClear === null
        ? 'No cloud history is loaded for this site yet.'
        : `In this month, the sky here has been clear about ${Math.round(metrics.pClear * 100)} times in 100 (average cloud cover ${Math.round(metrics.cloudPct ?? 0)} %). That is history, not a forecast.`,
    },
    checklist: checklistOf(trip.briefing_checklist),
    safety: safetyLines(site.kind),
    time: site.time, generatedAt: nowIso(),
  }
}
export type TripBriefing = Awaited<ReturnType<typeof briefing>>

/** Replaces the trip's "what to bring" list (organisers). */
export async function setChecklist(db: Kysely<Database>, user: User, tripId: number, items: string[]) {
  await getTripRow(db, tripId)
  await db.transaction().execute(async (trx) => {
    await trx.updateTable('trips').set({ briefing_checklist: JSON.stringify(items) }).where('id', '=', tripId).execute()
    await audit(trx, { action: 'briefing_checklist', actorUserId: user.id, detail: { tripId, items: items.length } })
  })
  return { checklist: items }
}
