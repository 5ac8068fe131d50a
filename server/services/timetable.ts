import * as Astronomy from 'astronomy-engine'
import type { Kysely } from 'kysely'
import { DEFAULT_CUES, SAFETY_LINES, type CueAnchor } from '../../shared/schemas/cues'
import { isoTenths } from '../../shared/eclipse/time'
import { localTime } from '../../shared/time/local'
import type { Database, User } from '../database/schema'
import { localReport } from '../eclipse/report'
import { audit } from './audit'
import { elementsInForce } from './eclipses'
import { NotFoundError, zoneAt } from './planning'
import { getTripRow, isTripGuide } from './trips'

const PLANETS: Array<[Astronomy.Body, string]> = [
  [Astronomy.Body.Venus, 'Venus'], [Astronomy.Body.Jupiter, 'Jupiter'], [Astronomy.Body.Mercury, 'Mercury'], [Astronomy.Body.Mars, 'Mars'], [Astronomy.Body.Saturn, 'Saturn'],
]
const COMPASS = ['N', 'NNE', 'NE', 'ENE', 'E', 'ESE', 'SE', 'SSE', 'S', 'SSW', 'SW', 'WSW', 'W', 'WNW', 'NW', 'NNW']
export const compass = (az: number) => COMPASS[Math.round((((az % 360) + 360) % 360) / 22.5) % 16]!

/** Planets above the horizon at an instant, with their direction (astronomy-engine, topocentric, refracted). */
export function planetsAt(utcMs: number, lat: number, lon: number, elevationM: number) {
  const time = Astronomy.MakeTime(new Date(utcMs))
  const obs = new Astronomy.Observer(lat, lon, elevationM)
  return PLANETS.map(([body, name]) => {
    const eq = Astronomy.Equator(body, time, obs, true, true)
    const hor = Astronomy.Horizon(time, obs, eq.ra, eq.dec, 'normal')
    const mag = Astronomy.Illumination(body, time).mag
    return { name, altitudeDeg: Math.round(hor.altitude), azimuthDeg: Math.round(hor.azimuth), magnitude: Math.round(mag * 10) / 10 }
  }).filter((p) => p.altitudeDeg > 3 && p.magnitude < 2.5)
}

/** May this user see the trip's timetable? Organisers, and guides assigned to the trip. */
export async function assertTimetableAccess(db: Kysely<Database>, user: User, tripId: number) {
  const trip = await getTripRow(db, tripId)
  if (user.role === 'organiser') return trip
  if (user.role === 'guide' && (await isTripGuide(db, tripId, user.id))) return trip
  throw new NotFoundError('No such trip')
}

export async function timetable(db: Kysely<Database>, tripId: number) {
  const trip = await getTripRow(db, tripId)
  const backups = await db.selectFrom('trip_backup_sites').select('site_id').where('trip_id', '=', tripId).orderBy('rank').execute()
  const siteIds = [trip.primary_site_id, ...backups.map((b) => b.site_id)]
  const rows = await db.selectFrom('sites').selectAll().where('id', 'in', siteIds).execute()
  const { el, deltaTOverride } = await elementsInForce(db, trip.eclipse_id)
  const offsets: Record<string, number> = trip.cue_offsets ? JSON.parse(trip.cue_offsets) : {}
  const sites = siteIds.map((sid, i) => {
    const s = rows.find((r) => r.id === sid)!
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
    const kind = (r.type === 'none' ? 'partial' : r.type) as 'total' | 'annular' | 'partial'
    const planets = contacts.max ? planetsAt(Date.parse(contacts.max.utc), s.lat, s.lon, s.elevation_m) : []
    const cues = DEFAULT_CUES.filter((c) => c.for.includes(kind) && contacts[c.anchor]).map((c) => {
      const offsetSec = offsets[c.key] ?? c.offsetSec
      const utcMs = Date.parse(contacts[c.anchor]!.utc) + offsetSec * 1000
      let label = c.label
      if (c.key === 'planets') label = planets.length ? `Look for ${planets.map((p) => `${p.name} ${p.altitudeDeg}° up in the ${compass(p.azimuthDeg)}`).join(', ')}` : 'No bright planet is above the horizon'
      if (c.key === 'filters-on' && contacts.c3?.direction) label += `; the diamond ring appears ${contacts.c3.direction}`
      if (c.key === 'beads' && contacts.c2?.direction) label += `; the last light is ${contacts.c2.direction}`
      return { key: c.key, anchor: c.anchor, offsetSec, label, filters: c.filters, utc: isoTenths(utcMs), ...localTime(utcMs, zone) }
    })
    return {
      siteId: s.id, name: s.name, role: i === 0 ? 'primary' : 'backup', lat: s.lat, lon: s.lon, elevationM: s.elevation_m,
      zone, utcOffset: (contacts.max ?? contacts.c1)?.utcOffset ?? localTime(Date.now(), zone).utcOffset,
      type: r.type, durationSec: r.durationSec, magnitude: r.magnitude, obscuration: r.obscuration,
      contacts, cues, planets, deltaTSec: r.deltaTSec, time: r.time, elementsSource: r.elementsSource, uncertaintyMethod: r.uncertainty.method,
    }
  })
  return {
    trip: { id: trip.id, title: trip.title, eclipseId: trip.eclipse_id, meetingPoint: { name: trip.meeting_name, timeUtc: trip.meeting_time_utc } },
    sites, safety: SAFETY_LINES, elements: el, deltaTSec: sites[0]?.deltaTSec ?? el.deltaTSec, generatedAt: new Date().toISOString(),
  }
}

export async function setCueOffsets(db: Kysely<Database>, user: User, tripId: number, offsets: Record<string, number>) {
  await db.transaction().execute(async (trx) => {
    await trx.updateTable('trips').set({ cue_offsets: JSON.stringify(offsets) }).where('id', '=', tripId).execute()
    await audit(trx, { action: 'cue_offsets', actorUserId: user.id, detail: { tripId, offsets } })
  })
}
