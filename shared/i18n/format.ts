import { formatMinor } from '../money/minorUnits'
import { roundedSecondMs, shownInstant } from '../time/local'
import { languageTag } from './locales'

/**
 * Dates, clock times, numbers, money and durations written the way a locale writes them (Intl),
 * for pages (composables/useFormat.ts), e-mails, calendar text and PDFs alike. Pure: no clock, no I/O.
 *
 * Two rules hold in every language:
 * - one instant, one rounding: a clock time is rounded once to the whole second (shared/time/local.ts)
 *   and its local and UTC forms are written from that one value;
 * - clock times carry their zone label, and UTC is always written "UTC" (never translated or
 *   replaced by a local abbreviation), so a printed time is never ambiguous.
 */
export interface Formatter {
  /** The BCP 47 tag in use, e.g. "de-DE". */
  tag: string
  /** "2 August 2027" / "2. August 2027": the calendar date at `zone` (UTC unless given). */
  date(utc: string | number, zone?: string): string
  /** "02/08/2027" / "02.08.2027": the short numeric date at `zone` (UTC unless given). */
  shortDate(utc: string | number, zone?: string): string
  /** "11:26:41 UTC+02:00" / "01:56:41 UTC": the 24-hour clock at `zone` with its label; `seconds: false` rounds to the minute. */
  clock(utc: string | number, zone?: string, opts?: { seconds?: boolean; label?: boolean }): string
  /** The date and the labelled clock together, e.g. "2. August 2027, 11:26 UTC+02:00". */
  dateTime(utc: string | number, zone?: string, opts?: { seconds?: boolean }): string
  /** "UTC+02:00" for a zone at an instant, "UTC" for UTC itself. */
  zoneLabel(utc: string | number, zone?: string): string
  /** A plain number: "1,234.5" / "1.234,5" / "1 234,5". */
  number(value: number, opts?: Intl.NumberFormatOptions): string
  /** A share in 0..1 as a percentage: "42 %" in German and French, "42%" in English. */
  percent(share: number, maximumFractionDigits?: number): string
  /** Money from integer minor units, with the currency's ISO 4217 decimals: "€1,234.50" / "1.234,50 €". */
  money(minor: number, currency: string): string
  /** A length of time from seconds: "2 min 31 s" / "2 Min., 31 Sek."; hours appear when there are any. */
  duration(seconds: number, opts?: { seconds?: boolean }): string
}

const UTC = 'UTC'
const cache = new Map<string, Formatter>()

export function formatterFor(code: string | null | undefined): Formatter {
  const tag = languageTag(code)
  let f = cache.get(tag)
  if (!f) {
    f = makeFormatter(tag)
    cache.set(tag, f)
  }
  return f
}

function makeFormatter(tag: string): Formatter {
  const dates = new Map<string, Intl.DateTimeFormat>()
  const dtf = (key: string, opts: Intl.DateTimeFormatOptions) => {
    let d = dates.get(key)
    if (!d) dates.set(key, (d = new Intl.DateTimeFormat(tag, opts)))
    return d
  }
  const ms = (utc: string | number) => roundedSecondMs(utc)
  const zoneLabel = (utc: string | number, zone = UTC) => {
    if (zone === UTC || zone === 'Etc/UTC') return UTC
    const off = shownInstant(utc, zone).utcOffset
    return off === '+00:00' ? `${UTC}±00:00` : `${UTC}${off}`
  }
  const clock = (utc: string | number, zone = UTC, opts: { seconds?: boolean; label?: boolean } = {}) => {
    const seconds = opts.seconds ?? true
    // To the minute: round the one instant to the minute (half up), then write it.
    const at = seconds ? ms(utc) : Math.floor(ms(utc) / 60_000 + 0.5) * 60_000
    const text = dtf(`clock:${zone}:${seconds}`, { timeZone: zone, hour: '2-digit', minute: '2-digit', ...(seconds ? { second: '2-digit' } : {}), hourCycle: 'h23' }).format(at)
    return opts.label === false ? text : `${text} ${zoneLabel(at, zone)}`
  }
  const units = (unit: 'hour' | 'minute' | 'second', n: number) => new Intl.NumberFormat(tag, { style: 'unit', unit, unitDisplay: 'short' }).format(n)
  const list = new Intl.ListFormat(tag, { style: 'narrow', type: 'unit' })
  return {
    tag,
    date: (utc, zone = UTC) => dtf(`date:${zone}`, { timeZone: zone, dateStyle: 'long' }).format(ms(utc)),
    shortDate: (utc, zone = UTC) => dtf(`short:${zone}`, { timeZone: zone, day: '2-digit', month: '2-digit', year: 'numeric' }).format(ms(utc)),
    clock,
    dateTime: (utc, zone = UTC, opts = {}) => `${dtf(`date:${zone}`, { timeZone: zone, dateStyle: 'long' }).format(ms(utc))}, ${clock(utc, zone, { seconds: opts.seconds ?? false })}`,
    zoneLabel,
    number: (value, opts) => new Intl.NumberFormat(tag, opts).format(value),
    percent: (share, maximumFractionDigits = 0) => new Intl.NumberFormat(tag, { style: 'percent', maximumFractionDigits }).format(share),
    money: (minor, currency) => formatMinor(minor, currency, tag),
    duration: (seconds, opts = {}) => {
      const withSeconds = opts.seconds ?? true
      const total = Math.max(0, withSeconds ? Math.floor(seconds + 0.5) : Math.floor(seconds / 60 + 0.5) * 60)
      const h = Math.floor(total / 3600)
      const m = Math.floor((total % 3600) / 60)
      const s = total % 60
      const parts: string[] = []
      if (h) parts.push(units('hour', h))
      if (m || (!withSeconds && !h) || (h && withSeconds && s)) parts.push(units('minute', m))
      if (withSeconds && (s || total === 0 || !parts.length)) parts.push(units('second', s))
      return list.format(parts)
    },
  }
}
