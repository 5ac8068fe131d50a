import { formatterFor, type Formatter } from '#shared/i18n/format'

/**
 * Intl formatting in the page's current language (see shared/i18n/format.ts for the rules): every
 * call reads the locale when it runs, so a template re-renders in the new language after a switch.
 *
 *   const f = useFormat()
 *   f.date(trip.startsAt, site.zone)      // "2. August 2027"
 *   f.clock(c2.utc, site.zone)            // "11:26:41 UTC+02:00";  f.clock(c2.utc) → "09:26:41 UTC"
 *   f.dateTime(hold.expiresAt, zone)      // "2. August 2027, 11:27 UTC+02:00"
 *   f.money(123450, 'EUR')                // "1.234,50 €"
 *   f.duration(151)                       // "2 Min., 31 Sek."
 *   f.number(1234.5), f.percent(0.42)
 */
export function useFormat(): Formatter {
  const { locale } = useI18n()
  const now = () => formatterFor(locale.value)
  return {
    get tag() { return now().tag },
    date: (...a) => now().date(...a),
    shortDate: (...a) => now().shortDate(...a),
    clock: (...a) => now().clock(...a),
    dateTime: (...a) => now().dateTime(...a),
    zoneLabel: (...a) => now().zoneLabel(...a),
    number: (...a) => now().number(...a),
    percent: (...a) => now().percent(...a),
    money: (...a) => now().money(...a),
    duration: (...a) => now().duration(...a),
  }
}
