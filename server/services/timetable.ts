import type { Kysely } from 'kysely'
import { deltaTHourAngleRad } from '../../shared/eclipse/besselian'
import { shadowApproachFromDeg } from '../../shared/eclipse/local'
import { isoTenths, utcMsToT } from '../../shared/eclipse/time'
import { HEIGHT_NOT_SET_NOTE } from '../../shared/sites/height'
import type { BesselianElements } from '../../shared/eclipse/types'
import { compassShort, compassWords, cueOffsetProblems, planCues, type CueAnchor, type CueInput } from '../../shared/safety/cues'
import { localKindOf, phaseWords, safetyLines } from '../../shared/safety/text'
import { localTime } from '../../shared/time/local'
import type { Database, User } from '../database/schema'
import { localReport, type LocalReport } from '../eclipse/report'
import { skyAt } from '../eclipse/sky'
import { haversineKm } from '../../shared/geo/distance'
import { chaseOrder } from '../../shared/planning/chase'
import { audit } from './audit'
import { cloudLookupFor } from './climatology'
import { elementsInForce } from './eclipses'
import { getWorkspace, NotFoundError, zoneAt } from './planning'
import { siteHorizon, terrainFor, terrainWarnings } from './terrain'
import { assertStaffReach, getTripRow, type TripRow } from './trips'
import { nowIso, nowMs } from './clock'
import { decisionInForce } from './decisionState'

export const compass = compassShort

/**
 * Bright planets above the horizon at an instant, with their direction (full VSOP87 via astronomia,
 * server/eclipse/sky.ts; checked against astronomy-engine in tests/unit/sky.spec.ts).
 */
export function planetsAt(utcMs: number, lat: number, lon: number, _elevationM: number) {
  return skyAt(utcMs, lat, lon).filter((o) => o.kind === 'planet')
    .map((o) => ({ name: o.name, altitudeDeg: Math.round(o.altitudeDeg), azimuthDeg: Math.round(o.azimuthDeg), magnitude: o.magnitude }))
    .filter((p) => p.altitudeDeg > 3 && p.magnitude < 2.5)
}

/** Refused cue edits: one message per cue, naming the allowed range. */
export class CueRuleError extends Error {
  constructor(public fields: Record<string, string>) { super(Object.values(fields).join('; ')) }
}

/** May this user see the trip's timetable? Organisers, and guides assigned to the trip. */
export async function assertTimetableAccess(db: Kysely<Database>, user: User, tripId: number) {
  const trip = await getTripRow(db, tripId)
  if (await assertStaffReach(db, user, trip)) return trip
  throw new NotFoundError('No such trip')
}

const CONTACTS: CueAnchor[] = ['c1', 'c2', 'max', 'c3', 'c4']

/** What the cue rule needs about one site, from its local report. */
export function cueInputFor(el: BesselianElements, r: LocalReport, trip: Pick<TripRow, 'filter_margin_sigmas' | 'filter_margin_end_sec'>,
  offsets: Record<string, number>, planets: CueInput['planets']): CueInput {
  const contacts: CueInput['contacts'] = {}
  for (const k of CONTACTS) {
    const c = r[k]
    if (c) contacts[k] = { utcMs: Date.parse(c.utc), uncertaintySec: c.uncertaintySec, direction: c.direction, ...(c.vertexAngleDeg !== undefined ? { vertexAngleDeg: c.vertexAngleDeg } : {}) }
  }
  let shadowFrom: string | undefined
  let shadowFromDeg: number | undefined
  if (r.max) {
    const clock = r.time.ttMinusUtcSec ?? r.time.deltaTSec
    const from = shadowApproachFromDeg(el, utcMsToT(el, Date.parse(r.max.utc), clock), deltaTHourAngleRad(r.time.deltaTSec))
    if (from !== null) { shadowFrom = compassWords(from); shadowFromDeg = from }
  }
  return {
    kind: localKindOf(r.type), contacts, offsets, planets, shadowFrom, ...(shadowFromDeg !== undefined ? { shadowFromDeg } : {}),
    margins: { sigmas: trip.filter_margin_sigmas, endSec: trip.filter_margin_end_sec },
  }
}

async function tripSites(db: Kysely<Database>, trip: TripRow) {
  const backups = await db.selectFrom('trip_backup_sites').select('site_id').where('trip_id', '=', trip.id).orderBy('rank').execute()
  const siteIds = [trip.primary_site_id, ...backups.map((b) => b.site_id)]
  const rows = await db.selectFrom('sites').selectAll().where('id', 'in', siteIds).execute()
  return siteIds.map((sid) => rows.find((r) => r.id === sid)!)
}

const offsetsOf = (trip: TripRow): Record<string, number> => (trip.cue_offsets ? JSON.parse(trip.cue_offsets) : {})

/** The trip's timetable; `locale` sets the language of its words, cues and safety text (English by default). */
export async function timetable(db: Kysely<Database>, tripId: number, locale?: string) {
  const trip = await getTripRow(db, tripId)
  const rows = await tripSites(db, trip)
  const { el, deltaTOverride } = await elementsInForce(db, trip.eclipse_id)
  const offsets = offsetsOf(trip)
  const cloud = await cloudLookupFor(db, await getWorkspace(db, trip.workspace_id))
  const terrain = await terrainFor(db, trip.workspace_id)
  const primary = rows[0]!
  const unordered = rows.map((s, i) => {
    const r = localReport(trip.eclipse_id, el, { latDeg: s.lat, lonDeg: s.lon, elevationM: s.elevation_m }, deltaTOverride)
    const zone = zoneAt(s.lat, s.lon)
    const contact = (k: CueAnchor) => {
      const c = r[k]
      if (!c) return undefined
      const lt = localTime(Date.parse(c.utc), zone)
      return {
        utc: c.utc, local: lt.local, utcOffset: lt.utcOffset, altitudeDeg: c.apparentAltitudeDeg, azimuthDeg: c.azimuthDeg, uncertaintySec: c.uncertaintySec,
        belowHorizon: c.belowHorizon, ...(c.direction ? { positionAngleDeg: c.positionAngleDeg, vertexAngleDeg: c.vertexAngleDeg, direction: c.direction } : {}),
      }
    }
    const contacts = { c1: contact('c1'), c2: contact('c2'), max: contact('max'), c3: contact('c3'), c4: contact('c4') }
    const kind = localKindOf(r.type)
    const planets = contacts.max ? planetsAt(Date.parse(contacts.max.utc), s.lat, s.lon, s.elevation_m) : []
    const plan = planCues({ ...cueInputFor(el, r, trip, offsets, planets), ...(locale ? { locale } : {}) })
    const cues = plan.cues.map((c) => ({ ...c, utc: isoTenths(c.utcMs), ...localTime(Date.parse(isoTenths(c.utcMs)), zone) }))
    const pClear = cloud(s).pClear
    const horizon = siteHorizon(terrain, el, r, { lat: s.lat, lon: s.lon, elevationM: s.elevation_m }, { profile: false })
    return {
      siteId: s.id, name: s.name, role: i === 0 ? 'primary' : 'backup', lat: s.lat, lon: s.lon, elevationM: s.elevation_m,
      /** False while nobody set the site's height: elevationM is then the sea level the contacts assume. */
      elevationSet: s.elevation_source !== null, heightNote: s.elevation_source === null ? HEIGHT_NOT_SET_NOTE : null,
      zone, utcOffset: (contacts.max ?? contacts.c1)?.utcOffset ?? localTime(nowMs(), zone).utcOffset,
      type: r.type, kind, words: phaseWords(kind, locale), durationSec: r.durationSec, magnitude: r.magnitude, obscuration: r.obscuration,
      contacts, cues, notice: plan.notice,
      filtersOffWindow: plan.window ? { startUtc: isoTenths(plan.window.startMs), endUtc: isoTenths(plan.window.endMs) } : null,
      planets, safety: safetyLines(kind, locale), deltaTSec: r.deltaTSec, time: r.time, elementsSource: r.elementsSource, uncertaintyMethod: r.uncertainty.method,
      /** The chase figures: expected seen seconds and the straight-line distance from the primary site. */
      chase: {
        pClear, expectedSec: pClear === null ? null : Math.round(r.durationSec * pClear * 10) / 10, durationSec: r.durationSec,
        distanceKm: Math.round(haversineKm(primary.lat, primary.lon, s.lat, s.lon) * 10) / 10, rank: i,
      },
      horizon: horizon ? { c1: horizon.c1, c2: horizon.c2, max: horizon.max, c3: horizon.c3, c4: horizon.c4, source: horizon.source, observerHeightM: horizon.observerHeightM } : null,
      terrainWarnings: terrainWarnings(horizon),
    }
  })
  // The fallback list is the chase plan, not the order the sites were typed in.
  const backups = chaseOrder(unordered.slice(1).map((x) => ({ ...x, ...x.chase })))
  const planned = [unordered[0]!, ...backups.map((b) => unordered.find((x) => x.siteId === b.siteId)!)]
  planned.forEach((x, i) => { x.chase.rank = i })
  // Once the day's decision is made, its site comes first everywhere (countdown, briefing, calendar);
  // the chase rank keeps the plan's order.
  const decided = await decisionInForce(db, tripId)
  const chosen = decided ? planned.find((x) => x.siteId === decided.siteId) : undefined
  const sites = (chosen ? [chosen, ...planned.filter((x) => x !== chosen)] : planned).map((x) => ({ ...x, chosen: x === chosen }))
  const decision = decided && chosen ? { ...decided, siteName: chosen.name, departLocal: localTime(Date.parse(decided.departAt), chosen.zone).local } : null
  const primaryKind = sites[0]?.kind ?? 'partial'
  return {
    trip: {
      id: trip.id, title: trip.title, eclipseId: trip.eclipse_id, meetingPoint: { name: trip.meeting_name, timeUtc: trip.meeting_time_utc },
      margins: { sigmas: trip.filter_margin_sigmas, endSec: trip.filter_margin_end_sec },
      /** Offsets saved on the trip (seconds from each cue's contact); cues not listed use the defaults. */
      cueOffsets: offsets,
    },
    /** The day's decision in force (its site is sites[0]), or null before one is made. */
    decision,
    sites, safety: safetyLines(primaryKind, locale), words: phaseWords(primaryKind, locale), elements: el, deltaTSec: sites[0]?.deltaTSec ?? el.deltaTSec,
    time: sites[0]?.time, generatedAt: nowIso(),
  }
}
export type Timetable = Awaited<ReturnType<typeof timetable>>

/**
 * Saves cue offsets (and, for organisers, wider margins) after checking them at every site of the
 * trip: an offset that would put a filters-off cue outside any site's window is refused whole.
 */
export async function setCueOffsets(db: Kysely<Database>, user: User, tripId: number, offsets: Record<string, number>,
  margins?: { sigmas: number; endSec: number }) {
  const trip = await getTripRow(db, tripId)
  const next = { ...trip, ...(margins ? { filter_margin_sigmas: margins.sigmas, filter_margin_end_sec: margins.endSec } : {}) }
  const rows = await tripSites(db, trip)
  const { el, deltaTOverride } = await elementsInForce(db, trip.eclipse_id)
  const fields: Record<string, string> = {}
  for (const s of rows) {
    const r = localReport(trip.eclipse_id, el, { latDeg: s.lat, lonDeg: s.lon, elevationM: s.elevation_m }, deltaTOverride)
    for (const p of cueOffsetProblems(cueInputFor(el, r, next, offsets, []), s.name)) fields[`offsets.${p.key}`] ??= p.message
  }
  if (Object.keys(fields).length) throw new CueRuleError(fields)
  await db.transaction().execute(async (trx) => {
    await trx.updateTable('trips').set({
      cue_offsets: JSON.stringify(offsets),
      ...(margins ? { filter_margin_sigmas: margins.sigmas, filter_margin_end_sec: margins.endSec } : {}),
    }).where('id', '=', tripId).execute()
    await audit(trx, { action: 'cue_offsets', actorUserId: user.id, detail: { tripId, offsets, margins } })
  })
}
