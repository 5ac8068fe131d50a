import { languageTag } from '#shared/i18n/locales'
import { tripFieldMessage } from '#shared/i18n/tripFieldMessages'
import { localAndUtcLine, roundedSecondMs } from '#shared/time/local'

/**
 * Dates, money, numbers and durations for the traveller's trip pages, in the page's language
 * (Intl with the locale's BCP 47 tag). Clock times are taken from one rounding
 * (shared/time/local.ts) and keep their zone label; UTC stays UTC.
 */
export function useTripFormat() {
  const { locale, t } = useI18n()
  const tag = computed(() => languageTag(locale.value))
  /** English keeps the house style of ISO calendar dates (YYYY-MM-DD) that its pages, e-mails and tests use. */
  const isEnglish = computed(() => locale.value === 'en')

  /** "2027-08-02" (a calendar date, no zone) → "2. August 2027" / "2 de agosto de 2027"; English keeps "2027-08-02". */
  function date(iso: string | null | undefined, style: 'long' | 'medium' = 'long'): string {
    if (!iso) return ''
    if (isEnglish.value) return iso.slice(0, 10)
    const [y, m, d] = iso.slice(0, 10).split('-').map(Number) as [number, number, number]
    if (!y || !m || !d) return iso
    return new Intl.DateTimeFormat(tag.value, { dateStyle: style, timeZone: 'UTC' }).format(new Date(Date.UTC(y, m - 1, d)))
  }
  /** Two calendar dates as a range, as the language writes one. */
  function dateRange(from: string, to: string): string {
    if (isEnglish.value) return `${from} – ${to}`
    const [a, b] = [from, to].map((s) => { const [y, m, d] = s.split('-').map(Number) as [number, number, number]; return new Date(Date.UTC(y, m - 1, d)) }) as [Date, Date]
    if (Number.isNaN(a.getTime()) || Number.isNaN(b.getTime())) return `${from} – ${to}`
    return new Intl.DateTimeFormat(tag.value, { dateStyle: 'long', timeZone: 'UTC' }).formatRange(a, b)
  }
  /** An instant as date and clock in UTC, to the minute (the caller adds the "UTC" label): "02.08.2027, 09:13". */
  function utcDateTime(iso: string): string {
    const ms = Date.parse(iso)
    if (Number.isNaN(ms) || isEnglish.value) return iso.slice(0, 16).replace('T', ' ')
    return new Intl.DateTimeFormat(tag.value, { dateStyle: 'medium', timeStyle: 'short', timeZone: 'UTC', hourCycle: 'h23' }).format(new Date(ms))
  }
  /** A local wall clock "YYYY-MM-DD HH:MM[:SS]" (already in the site's zone) as date and time in the page's language. */
  function localDateTime(local: string): string {
    const m = /^(\d{4})-(\d{2})-(\d{2})[ T](\d{2}):(\d{2})/.exec(local)
    if (!m || isEnglish.value) return local.slice(0, 16).replace('T', ' ')
    const d = new Date(Date.UTC(+m[1]!, +m[2]! - 1, +m[3]!, +m[4]!, +m[5]!))
    return new Intl.DateTimeFormat(tag.value, { dateStyle: 'medium', timeStyle: 'short', timeZone: 'UTC', hourCycle: 'h23' }).format(d)
  }
  /** An instant's date and clock in a named zone (the device's own without one), to the rounded second; the caller names the zone. */
  function zonedDateTime(iso: string, zone?: string): string {
    const ms = Date.parse(iso)
    if (Number.isNaN(ms)) return iso
    return new Intl.DateTimeFormat(tag.value, { dateStyle: isEnglish.value ? undefined : 'medium', timeStyle: isEnglish.value ? undefined : 'medium', ...(isEnglish.value ? { year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', second: '2-digit' } : {}), timeZone: zone, hourCycle: 'h23' }).format(new Date(roundedSecondMs(ms)))
  }
  function money(minor: number, currency: string): string {
    return new Intl.NumberFormat(tag.value, { style: 'currency', currency: currency.toUpperCase() }).format(minor / 100)
  }
  function number(n: number, digits = 0): string {
    return new Intl.NumberFormat(tag.value, { minimumFractionDigits: digits, maximumFractionDigits: digits }).format(n)
  }
  /** A duration of seconds as minutes and seconds ("2 min 41 s" / "2 Min. 41 s"), rounded to the second unless `tenths`. */
  function duration(sec: number, tenths = false): string {
    const s = tenths ? Math.round(sec * 10) / 10 : Math.round(sec)
    const min = Math.floor(s / 60), rest = s - min * 60
    return t('trip.duration.minSec', { min: number(min), sec: number(rest, tenths ? 1 : 0) })
  }
  /** A bearing in words of the language: 250° → "west-southwest" / "Westsüdwest". */
  function compass(deg: number): string {
    const sector = Math.round((((deg % 360) + 360) % 360) / 22.5) % 16
    return t(`trip.compass.${sector}`)
  }
  /**
   * The time-basis line under a table with local and UTC columns. English keeps the shared wording
   * (shared/time/local.ts); other languages say the same in their words and keep the TT − UTC and ΔT
   * figures and their sources as computed.
   */
  function timeLine(line: string, local: { zone: string; utcOffset?: string | null }): string {
    if (isEnglish.value) return localAndUtcLine(line, local)
    const m = /^Times are (UTC|UT)( \(before 1972 there was no UTC\))?\.\s*/.exec(line)
    const clock = m?.[1] ?? 'UTC'
    const rest = (m ? line.slice(m[0].length) : line).replace(/\bi\.e\./g, t('trip.time.ie'))
    const offset = local.utcOffset ? ` (UTC${local.utcOffset})` : ''
    return `${t(clock === 'UT' ? 'trip.time.localAndUt' : 'trip.time.localAndUtc', { zone: local.zone, offset })} ${rest}`.trim()
  }
  /**
   * A field message from the shared schemas or the server, in the page's language. The schemas
   * speak English; the messages a traveller meets on the trip and participant forms are recognised
   * here by their wording and said again with the same figures. Anything else stays as it came.
   */
  function fieldError(msg: string | null | undefined): string {
    if (!msg || isEnglish.value) return msg ?? ''
    const known = tripFieldMessage(msg)
    if (!known) return msg
    const params = { ...known.params }
    for (const k of known.dates ?? []) params[k] = date(params[k])
    return t(`participant.error.${known.key}`, params)
  }
  return { tag, fieldError, timeLine, isEnglish, date, dateRange, utcDateTime, localDateTime, zonedDateTime, money, number, duration, compass }
}
