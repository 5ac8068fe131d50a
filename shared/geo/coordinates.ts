/**
 * Parses one angle written as decimal degrees or degrees-minutes-seconds, with an optional
 * hemisphere letter before or after: "25.6872", "-80.09", "25°41'14\"N", "25 41 14 N",
 * "N 25° 41.23'", "80°5'24\" W". Returns degrees (north and east positive) or null.
 */
export function parseAngle(text: string, axis: 'lat' | 'lon'): number | null {
  let s = text.trim().toUpperCase().replace(/[′’]/g, "'").replace(/[″”]/g, '"').replace(/,/g, '.')
  if (!s) return null
  let sign = 1
  const hemi = axis === 'lat' ? /^[NS]|[NS]$/ : /^[EW]|[EW]$/
  const h = s.match(hemi)
  if (h) {
    if (h[0] === 'S' || h[0] === 'W') sign = -1
    s = s.replace(hemi, '').trim()
  } else if (/[NSEW]/.test(s)) {
    return null // a letter for the other axis
  }
  const m = s.match(/^([+-]?\d+(?:\.\d+)?)\s*(?:°|D|\s)?\s*(?:(\d+(?:\.\d+)?)\s*(?:'|M|\s)?\s*(?:(\d+(?:\.\d+)?)\s*(?:"|S|'')?)?)?$/)
  if (!m) return null
  const deg = Number(m[1])
  const min = m[2] ? Number(m[2]) : 0
  const sec = m[3] ? Number(m[3]) : 0
  if (min >= 60 || sec >= 60 || ((m[2] || m[3]) && !Number.isInteger(deg))) return null
  const value = (Math.abs(deg) + min / 60 + sec / 3600) * (deg < 0 || m[1]!.startsWith('-') ? -1 : 1) * sign
  const limit = axis === 'lat' ? 90 : 180
  return Math.abs(value) <= limit ? value : null
}

/** Parses "lat, lon" or "lat lon" in either notation. Returns an error message when it cannot. */
export function parseCoordinatePair(text: string): { lat: number; lon: number } | { error: string } {
  const t = text.trim()
  // Split on a comma or semicolon between the two, or on the space after a hemisphere letter.
  let parts = t.split(/\s*[;,]\s*(?=[-+NSEW\d])/i)
  if (parts.length !== 2) {
    const m = t.match(/^(.*?[NS])\s+(.*[EW]|[EW].*)$/i) ?? t.match(/^([NS].*?)\s+([EW].*)$/i)
    parts = m ? [m[1]!, m[2]!] : t.split(/\s+/)
  }
  if (parts.length !== 2) return { error: 'Enter latitude and longitude, e.g. "25.6872, 32.6396" or "25°41\'14"N 32°38\'23"E"' }
  const lat = parseAngle(parts[0]!, 'lat')
  const lon = parseAngle(parts[1]!, 'lon')
  if (lat === null) return { error: 'Latitude must be −90 to 90 (decimal or degrees-minutes-seconds)' }
  if (lon === null) return { error: 'Longitude must be −180 to 180 (decimal or degrees-minutes-seconds)' }
  return { lat, lon }
}
