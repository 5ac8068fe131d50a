import { createEvents, type EventAttributes } from 'ics'
import { phaseWords, safetyParagraph, type LocalKind } from '../../shared/safety/text'
import { roundedSecondMs } from '../../shared/time/local'

interface ContactLike { utc: string }
interface SiteLike {
  siteId: number; name: string; lat: number; lon: number; zone: string
  kind: LocalKind
  contacts: Partial<Record<'c1' | 'c2' | 'max' | 'c3' | 'c4', ContactLike | undefined>>
  cues?: Array<{ key: string; utc: string; label: string; filters: 'on' | 'off' }>
  /** The time-basis line (TT − UTC, UT1 − UTC, ΔT) that every output states. */
  time?: { line: string }
}

/**
 * RFC 5545 events (times in UTC, so every calendar shows them in its own zone correctly).
 * Every event carries the safety text and the time basis; contact names follow the local kind
 * of eclipse, so an annular site never reads "totality".
 */
export function contactEvents(trip: { id: number; title: string; eclipseId: string }, site: SiteLike, withCues: boolean): EventAttributes[] {
  const words = phaseWords(site.kind)
  const footer = `${safetyParagraph(site.kind)}${site.time ? `\n${site.time.line}` : ''}`
  const events: EventAttributes[] = []
  for (const k of ['c1', 'c2', 'max', 'c3', 'c4'] as const) {
    const c = site.contacts[k]
    if (!c) continue
    events.push({
      uid: `umbrafield-trip${trip.id}-site${site.siteId}-${k}@umbrafield`, title: `${words.contact[k]} · ${site.name}`,
      start: roundedSecondMs(c.utc), startInputType: 'utc', startOutputType: 'utc', duration: { minutes: 1 },
      location: site.name, geo: { lat: site.lat, lon: site.lon }, description: `${trip.title}. ${words.eclipseName} of ${trip.eclipseId}. Local time zone ${site.zone}.\n${footer}`,
    })
  }
  if (withCues) {
    for (const cue of site.cues ?? []) {
      events.push({
        uid: `umbrafield-trip${trip.id}-site${site.siteId}-cue-${cue.key}@umbrafield`, title: `Cue: ${cue.label} [filters ${cue.filters}]`,
        start: roundedSecondMs(cue.utc), startInputType: 'utc', startOutputType: 'utc', duration: { minutes: 1 }, location: site.name,
        description: `${trip.title}. Cue at ${site.name}: ${cue.label}. Filters ${cue.filters}.\n${footer}`,
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

/** The day's decision as a calendar event: leaving the meeting point for the chosen site. */
export function departureEvent(trip: { id: number; title: string }, d: { id: number; siteName: string; departAt: string; meetingPoint: string; message: string | null }): EventAttributes {
  return {
    uid: `umbrafield-trip${trip.id}-decision@umbrafield`, title: `Leave for ${d.siteName} (the day's decision)`,
    start: Date.parse(d.departAt), startInputType: 'utc', startOutputType: 'utc', duration: { minutes: 15 }, location: d.meetingPoint,
    // A changed decision keeps the UID and raises the sequence, so calendars update the event in place.
    sequence: d.id,
    description: `${trip.title}: we observe from ${d.siteName}. Meet at ${d.meetingPoint}.${d.message ? `\n${d.message}` : ''}`,
  }
}

/** A site's contacts and cues; for the site chosen for the day, the departure first. */
export function siteTimetableIcs(trip: { id: number; title: string; eclipseId: string }, site: SiteLike, decision?: Parameters<typeof departureEvent>[1] | null): string {
  return toIcs([...(decision ? [departureEvent(trip, decision)] : []), ...contactEvents(trip, site, true)])
}
