import { deltaTAt, type DeltaTEstimate } from './deltaT'

/**
 * The clock times Umbrafield shows are UTC, what clocks and phones keep. Element sets run on TT;
 * the Earth turns with UT1. The three are tied by
 *   TT − UTC = 32.184 s + (TAI − UTC)            (exact, from the leap-second table)
 *   ΔT = TT − UT1,   UT1 − UTC = (TT − UTC) − ΔT  (from the ΔT series or its prediction)
 * ΔT places the shadow on the turning Earth; TT − UTC turns TT instants into clock times.
 * Before 1972 there was no UTC with whole leap seconds: times are then UT (UT1), TT − UT = ΔT.
 */

/** TT − TAI, seconds: fixed by definition (IAU 1991). */
export const TT_MINUS_TAI_SEC = 32.184

/**
 * TAI − UTC from 1972-01-01, seconds, and the UTC date each value starts.
 * Source: IERS Bulletin C / the leap-second table (USNO tai-utc.dat). The last change was
 * 2017-01-01; Bulletin C 72 (July 2026) announced no leap second at the end of December 2026.
 */
export const LEAP_SECONDS: ReadonlyArray<readonly [string, number]> = [
  ['1972-01-01', 10], ['1972-07-01', 11], ['1973-01-01', 12], ['1974-01-01', 13], ['1975-01-01', 14],
  ['1976-01-01', 15], ['1977-01-01', 16], ['1978-01-01', 17], ['1979-01-01', 18], ['1980-01-01', 19],
  ['1981-07-01', 20], ['1982-07-01', 21], ['1983-07-01', 22], ['1985-07-01', 23], ['1988-01-01', 24],
  ['1990-01-01', 25], ['1991-01-01', 26], ['1992-07-01', 27], ['1993-07-01', 28], ['1994-07-01', 29],
  ['1996-01-01', 30], ['1997-07-01', 31], ['1999-01-01', 32], ['2006-01-01', 33], ['2009-01-01', 34],
  ['2012-07-01', 35], ['2015-07-01', 36], ['2017-01-01', 37],
]
/** Up to this UTC date the table is known: no later leap second had been announced when it was last checked. */
export const LEAP_SECONDS_KNOWN_UNTIL = '2027-06-30'

const LEAP_MS = LEAP_SECONDS.map(([d, v]) => [Date.parse(d + 'T00:00:00Z'), v] as const)

/** TAI − UTC at a UTC instant, seconds; null before 1972, when UTC had no whole leap seconds. */
export function taiMinusUtcAt(utcMs: number): number | null {
  if (utcMs < LEAP_MS[0]![0]) return null
  let v = LEAP_MS[0]![1]
  for (const [start, s] of LEAP_MS) if (utcMs >= start) v = s
  return v
}

/** How an instant's clock time and Earth rotation are fixed: every output states these. */
export interface TimeBasis {
  /** 'UTC' from 1972; 'UT' (UT1) before. */
  clock: 'UTC' | 'UT'
  /** TT minus the clock, seconds: 32.184 + (TAI − UTC) for UTC; ΔT for UT. */
  ttMinusClockSec: number
  /** UT1 − UTC, seconds (0 when the clock is UT1 itself). */
  ut1MinusUtcSec: number
  /** ΔT = TT − UT1 and its one-sigma, seconds. */
  deltaTSec: number
  deltaTSigmaSec: number
  deltaTBasis: DeltaTEstimate['basis'] | 'override' | 'published'
  /** Sources, in words, for the clock offset and for ΔT. */
  clockSource: string
  deltaTSource: string
}

/**
 * The time basis at a UTC instant. `deltaTOverride` (an organiser's or a request's ΔT) replaces the
 * model's ΔT; the clock offset still comes from the leap-second table, so UT1 − UTC follows.
 */
export function timeBasisAt(utcMs: number, deltaTOverride?: { deltaTSec: number; basis: 'override' | 'published'; source: string } | null): TimeBasis {
  const model = deltaTAt(utcMs)
  const deltaTSec = deltaTOverride ? deltaTOverride.deltaTSec : model.deltaTSec
  const tai = taiMinusUtcAt(utcMs)
  const common = {
    deltaTSec,
    deltaTSigmaSec: model.sigmaSec,
    deltaTBasis: deltaTOverride ? deltaTOverride.basis : model.basis,
    deltaTSource: deltaTOverride ? deltaTOverride.source : model.source,
  }
  if (tai === null) {
    return { ...common, clock: 'UT', ttMinusClockSec: deltaTSec, ut1MinusUtcSec: 0, clockSource: 'before 1972 times are UT (UT1): TT − UT = ΔT' }
  }
  const ttMinusUtc = TT_MINUS_TAI_SEC + tai
  const known = new Date(utcMs).toISOString().slice(0, 10) <= LEAP_SECONDS_KNOWN_UNTIL
  return {
    ...common,
    clock: 'UTC',
    ttMinusClockSec: ttMinusUtc,
    ut1MinusUtcSec: Math.round((ttMinusUtc - deltaTSec) * 1000) / 1000,
    clockSource: `TT − TAI = 32.184 s; TAI − UTC = ${tai} s from the IERS leap-second table (Bulletin C)` +
      (known ? '' : `; no leap second announced after ${LEAP_SECONDS_KNOWN_UNTIL}, so none is assumed`),
  }
}

/** One line stating the basis, for footers, e-mails and calendar files. */
export function timeBasisLine(b: TimeBasis): string {
  if (b.clock === 'UT') return `Times are UT (before 1972 there was no UTC). ΔT = TT − UT = ${b.deltaTSec.toFixed(1)} ± ${b.deltaTSigmaSec.toFixed(1)} s (${b.deltaTSource}).`
  return `Times are UTC. TT − UTC = ${b.ttMinusClockSec.toFixed(3)} s (${b.clockSource}); ` +
    `UT1 − UTC = ${b.ut1MinusUtcSec >= 0 ? '+' : '−'}${Math.abs(b.ut1MinusUtcSec).toFixed(2)} ± ${b.deltaTSigmaSec.toFixed(1)} s, ` +
    `i.e. ΔT = ${b.deltaTSec.toFixed(2)} s (${b.deltaTSource}).`
}
