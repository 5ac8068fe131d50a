/**
 * How to name a ship's time zone honestly. Offshore, the time-zone boundaries give the nautical zones
 * (IANA `Etc/GMT+n`, `Etc/GMT-n`), whose names carry the POSIX sign: `Etc/GMT+2` is two hours BEHIND
 * UTC (UTC−02:00). The offset is what a reader needs, so it comes first and the IANA name is given
 * only as the source. Inside territorial waters the zone is the coast's civil zone and is named as it is.
 */
export function isNauticalZone(zone: string): boolean {
  return /^Etc\/(GMT|UTC)([+-]\d{1,2})?$/.test(zone)
}

/** "UTC−02:00, the nautical zone at the intercept (IANA Etc/GMT+2, sign reversed by convention)". */
export function shipZoneLabel(zone: string, utcOffset: string): string {
  const off = `UTC${utcOffset}`
  if (isNauticalZone(zone)) {
    return /[+-]\d/.test(zone)
      ? `${off}, the nautical time zone at the intercept (IANA ${zone}: its sign is reversed by convention)`
      : `${off}, the nautical time zone at the intercept (IANA ${zone})`
  }
  return `${zone} (${off} on the day), the civil time zone at the intercept`
}
