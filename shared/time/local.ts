import { translate } from '../i18n/translate'

/**
 * Local civil time of a UTC instant in an IANA zone, with the UTC offset in force then
 * (the zone rules of the date, daylight saving included). Uses the platform's Intl data.
 */
export interface LocalTime {
  /** "2027-08-02 12:03:27" (local wall clock, to the second). */
  local: string
  /** "+02:00" — UTC offset in force at that instant. */
  utcOffset: string
  /** IANA zone name, e.g. "Africa/Cairo". */
  zone: string
}

const formatters = new Map<string, Intl.DateTimeFormat>()
function formatter(zone: string): Intl.DateTimeFormat {
  let f = formatters.get(zone)
  if (!f) {
    f = new Intl.DateTimeFormat('en-CA', {
      timeZone: zone, year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit',
      second: '2-digit', hourCycle: 'h23', timeZoneName: 'longOffset',
    })
    formatters.set(zone, f)
  }
  return f
}

/**
 * An instant rounded once to the shown precision, the whole second, half up: every output (page,
 * PDF, e-mail, calendar, countdown) formats its local and UTC forms from this one value, so the two
 * always name the same second ("11:26:41" local is never "01:56:40 UTC").
 */
export function roundedSecondMs(utc: number | string): number {
  const ms = typeof utc === 'number' ? utc : Date.parse(utc)
  return Math.floor(ms / 1000 + 0.5) * 1000
}

/** "01:56:41": the UTC clock of the instant, to the rounded second. */
export function utcClock(utc: number | string): string {
  return new Date(roundedSecondMs(utc)).toISOString().slice(11, 19)
}

/** The instant in both forms from one rounding: local wall clock (with offset and zone) and UTC. */
export interface ShownInstant extends LocalTime {
  /** "11:26:41": local clock only. */
  localClock: string
  /** "01:56:41": UTC clock. */
  utc: string
  /** ISO 8601 of the rounded second, e.g. "2027-08-02T01:56:41.000Z". */
  utcIso: string
}
export function shownInstant(utc: number | string, zone: string): ShownInstant {
  const ms = roundedSecondMs(utc)
  const l = localTime(ms, zone)
  const iso = new Date(ms).toISOString()
  return { ...l, localClock: l.local.slice(11), utc: iso.slice(11, 19), utcIso: iso }
}

export function localTime(utcMs: number, zone: string): LocalTime {
  // Round to the nearest second first (the same rounding as utcClock), so local and UTC agree.
  const parts = Object.fromEntries(formatter(zone).formatToParts(new Date(roundedSecondMs(utcMs))).map((p) => [p.type, p.value]))
  const off = (parts.timeZoneName ?? 'GMT').replace('GMT', '') || '+00:00'
  return { local: `${parts.year}-${parts.month}-${parts.day} ${parts.hour}:${parts.minute}:${parts.second}`, utcOffset: off, zone }
}

/**
 * The time-basis line for a table or list with a local column beside a UTC one: its opening "Times
 * are UTC." would read as if the local column were UTC too, so it says which column is which first.
 * `line` is timeBasisLine's text; the rest of it (TT − UTC, ΔT and their sources) is kept.
 */
export function localAndUtcLine(line: string, local: { zone: string; utcOffset?: string | null }, locale?: string | null): string {
  const m = /^Times are (UTC|UT)( \(before 1972 there was no UTC\))?\.\s*/.exec(line)
  const clock = m?.[1] ?? 'UTC'
  const offset = local.utcOffset ? ` (UTC${local.utcOffset})` : ''
  const rest = m ? line.slice(m[0].length) : line
  return `${translate(locale, clock === 'UT' ? 'doc.time.localAndUt' : 'doc.time.localAndUtc', { zone: local.zone, offset })} ${rest}`.trim()
}

/** timeBasisLine's text with its opening sentence ("Times are UTC.") in a locale; the figures and sources that follow are kept. */
export function basisLineIn(line: string, locale?: string | null): string {
  const m = /^Times are (UTC|UT)( \(before 1972 there was no UTC\))?\.\s*/.exec(line)
  if (!m) return line
  return `${translate(locale, m[1] === 'UT' ? 'doc.time.timesUt' : 'doc.time.timesUtc')} ${line.slice(m[0].length)}`.trim()
}
