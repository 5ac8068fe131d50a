import { createEvents, type EventAttributes } from 'ics'
import { phaseWords, safetyParagraph, type LocalKind } from '../../shared/safety/text'
import { basisLineIn, roundedSecondMs } from '../../shared/time/local'
import { translator } from '../../shared/i18n/translate'

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
export function contactEvents(trip: { id: number; title: string; eclipseId: string }, site: SiteLike, withCues: boolean, locale?: string): EventAttributes[] {
  const t = translator(locale)
  const words = phaseWords(site.kind, locale)
  const footer = `${safetyParagraph(site.kind, locale)}${site.time ? `\n${basisLineIn(site.time.line, locale)}` : ''}`
  const events: EventAttributes[] = []
  for (const k of ['c1', 'c2', 'max', 'c3', 'c4'] as const) {
    const c = site.contacts[k]
    if (!c) continue
    events.push({
      uid: `umbrafield-trip${trip.id}-site${site.siteId}-${k}@umbrafield`, title: `${words.contact[k]} · ${site.name}`,
      start: roundedSecondMs(c.utc), startInputType: 'utc', startOutputType: 'utc', duration: { minutes: 1 },
      location: site.name, geo: { lat: site.lat, lon: site.lon }, description: `${t('doc.ics.contactDescription', { trip: trip.title, eclipse: words.eclipseName, eclipseId: trip.eclipseId, zone: site.zone })}\n${footer}`,
    })
  }
  if (withCues) {
    for (const cue of site.cues ?? []) {
      events.push({
        uid: `umbrafield-trip${trip.id}-site${site.siteId}-cue-${cue.key}@umbrafield`, title: t(cue.filters === 'on' ? 'doc.ics.cueTitleOn' : 'doc.ics.cueTitleOff', { label: cue.label }),
        start: roundedSecondMs(cue.utc), startInputType: 'utc', startOutputType: 'utc', duration: { minutes: 1 }, location: site.name,
        description: `${t(cue.filters === 'on' ? 'doc.ics.cueDescriptionOn' : 'doc.ics.cueDescriptionOff', { trip: trip.title, site: site.name, label: cue.label })}\n${footer}`,
      })
    }
  }
  return events
}

export function toIcs(events: EventAttributes[], locale?: string): string {
  const calName = translator(locale)('doc.ics.calName')
  const { error, value } = createEvents(events.map((e) => ({ productId: 'umbrafield/timetable', calName, ...e })))
  if (error || !value) throw error ?? new Error('could not build the calendar')
  return value
}

/** The day's decision as a calendar event: leaving the meeting point for the chosen site. */
export function departureEvent(trip: { id: number; title: string }, d: { id: number; siteName: string; departAt: string; meetingPoint: string; message: string | null }, locale?: string): EventAttributes {
  const t = translator(locale)
  return {
    uid: `umbrafield-trip${trip.id}-decision@umbrafield`, title: t('doc.ics.departTitle', { site: d.siteName }),
    start: Date.parse(d.departAt), startInputType: 'utc', startOutputType: 'utc', duration: { minutes: 15 }, location: d.meetingPoint,
    // A changed decision keeps the UID and raises the sequence, so calendars update the event in place.
    sequence: d.id,
    description: `${t('doc.ics.departDescription', { trip: trip.title, site: d.siteName, place: d.meetingPoint })}${d.message ? `\n${d.message}` : ''}`,
  }
}

/** A site's contacts and cues; for the site chosen for the day, the departure first. */
export function siteTimetableIcs(trip: { id: number; title: string; eclipseId: string }, site: SiteLike, decision?: Parameters<typeof departureEvent>[1] | null, locale?: string): string {
  return toIcs([...(decision ? [departureEvent(trip, decision, locale)] : []), ...contactEvents(trip, site, true, locale)], locale)
}
