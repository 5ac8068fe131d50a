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

export function localTime(utcMs: number, zone: string): LocalTime {
  // Round to the nearest second first, so the local and UT strings agree on the second.
  const parts = Object.fromEntries(formatter(zone).formatToParts(new Date(Math.round(utcMs / 1000) * 1000)).map((p) => [p.type, p.value]))
  const off = (parts.timeZoneName ?? 'GMT').replace('GMT', '') || '+00:00'
  return { local: `${parts.year}-${parts.month}-${parts.day} ${parts.hour}:${parts.minute}:${parts.second}`, utcOffset: off, zone }
}
