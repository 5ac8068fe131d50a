import { createEvents, type EventAttributes } from 'ics'

interface ContactLike { utc: string }
interface SiteLike {
  siteId: number; name: string; lat: number; lon: number; zone: string
  contacts: Partial<Record<'c1' | 'c2' | 'max' | 'c3' | 'c4', ContactLike | undefined>>
  cues?: Array<{ key: string; utc: string; label: string }>
}
const NAMES: Record<string, string> = { c1: 'C1 — partial eclipse begins', c2: 'C2 — central phase begins', max: 'Maximum eclipse', c3: 'C3 — central phase ends', c4: 'C4 — partial eclipse ends' }
const SAFETY = 'Eye safety: ISO 12312-2 viewers for every partial phase; filters on the front of any optics; an annular or partial phase is never safe to the naked eye; follow local rules.'

/** RFC 5545 events (times in UTC, so every calendar shows them in its own zone correctly). */
export function contactEvents(trip: { id: number; title: string; eclipseId: string }, site: SiteLike, withCues: boolean): EventAttributes[] {
  const events: EventAttributes[] = []
  for (const k of ['c1', 'c2', 'max', 'c3', 'c4'] as const) {
    const c = site.contacts[k]
    if (!c) continue
    events.push({
      uid: `umbrafield-trip${trip.id}-site${site.siteId}-${k}@umbrafield`, title: `${NAMES[k]} · ${site.name}`,
      start: Math.round(Date.parse(c.utc) / 1000) * 1000, startInputType: 'utc', startOutputType: 'utc', duration: { minutes: 1 },
      location: site.name, geo: { lat: site.lat, lon: site.lon }, description: `${trip.title}. Local time zone ${site.zone}. ${SAFETY}`,
    })
  }
  if (withCues) {
    for (const cue of site.cues ?? []) {
      events.push({
        uid: `umbrafield-trip${trip.id}-site${site.siteId}-cue-${cue.key}@umbrafield`, title: `Cue: ${cue.label}`,
        start: Math.round(Date.parse(cue.utc) / 1000) * 1000, startInputType: 'utc', startOutputType: 'utc', duration: { minutes: 1 }, location: site.name,
      })
    }
  }
  return events
}

export function toIcs(events: EventAttributes[]): string {
  const { error, value } = createEvents(events.map((e) => ({ productId: 'umbrafield/timetable', calName: 'Umbrafield eclipse', ...e })))
  if (error || !value) throw error ?? new Error('could not build the calendar')
  return value
}

export function siteTimetableIcs(trip: { id: number; title: string; eclipseId: string }, site: SiteLike): string {
  return toIcs(contactEvents(trip, site, true))
}
