import { JD_UNIX_EPOCH } from './constants'
import type { BesselianElements } from './types'

/** Julian Day (TDT) of 0h TDT on a YYYY-MM-DD date (proleptic Gregorian). */
export function jdOfDate(date: string): number {
  const m = /^(-?\d{1,4})-(\d{2})-(\d{2})$/.exec(date)
  if (!m) throw new Error(`bad date "${date}", expected YYYY-MM-DD`)
  const ms = Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]))
  return ms / 86_400_000 + JD_UNIX_EPOCH
}

const t0Cache = new WeakMap<BesselianElements, { date: string; t0: number; jd: number }>()

/** Julian Day (TDT) of the element set's t0 (memoised per set: it is on every time conversion's path). */
export function jdT0(el: BesselianElements): number {
  const c = t0Cache.get(el)
  if (c && c.date === el.date && c.t0 === el.t0Tdt) return c.jd
  const jd = jdOfDate(el.date) + el.t0Tdt / 24
  t0Cache.set(el, { date: el.date, t0: el.t0Tdt, jd })
  return jd
}

/**
 * Clock instant (ms since the Unix epoch) of t hours after t0 (TT), given TT minus the clock in
 * seconds: 32.184 + (TAI − UTC) for UTC (see timeScales.ts), or ΔT for UT1.
 */
export function tToUtcMs(el: BesselianElements, tHours: number, ttMinusClockSec: number): number {
  return (jdT0(el) - JD_UNIX_EPOCH) * 86_400_000 + tHours * 3_600_000 - ttMinusClockSec * 1000
}

/** Inverse of {@link tToUtcMs}: hours after t0 (TT) of a clock instant. */
export function utcMsToT(el: BesselianElements, utcMs: number, ttMinusClockSec: number): number {
  return (utcMs + ttMinusClockSec * 1000 - (jdT0(el) - JD_UNIX_EPOCH) * 86_400_000) / 3_600_000
}

/** ISO 8601 UTC with tenths of a second, e.g. 2024-04-08T19:16:17.2Z. */
export function isoTenths(utcMs: number): string {
  const rounded = Math.round(utcMs / 100) * 100
  const iso = new Date(rounded).toISOString() // ...:17.200Z
  return iso.slice(0, 21) + 'Z'
}
