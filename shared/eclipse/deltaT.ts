import { HISTORIC_FIRST_YEAR, HISTORIC_HALF_YEARLY, MONTHLY, MONTHLY_FIRST } from './deltaTData'

/**
 * ΔT = TT − UT1, in seconds: how far the Earth's rotation lags uniform time.
 *
 * Model, by date:
 * 1. 2026-10 back to 1973-02: USNO monthly determinations (deltat.data), linear between months.
 *    One sigma 0.1 s: the determinations are good to milliseconds; the margin covers the
 *    interpolation between month starts and the short-period tides that monthly values smooth over.
 * 2. 1973 back to 1657: USNO half-yearly historic values. One sigma 0.1 s from 1955.5 (atomic
 *    clocks), 0.5 s before.
 * 3. Before 1657: Espenak & Meeus (2006) polynomial for 1600–1657, Morrison & Stephenson (2004)
 *    parabola before, with a sigma that grows with age (these dates are outside Umbrafield's use).
 * 4. After the last observation (n years later), a prediction:
 *      ΔT(n) = ΔT_last + r·min(n, 2) + 0.0032·n²
 *    r is the mean rate over the last twelve observed months, carried for at most two years
 *    (the way short-term rotation forecasts are made: the last value and its recent drift);
 *    0.0032 s/yr² is the curvature of the long-term tidal-braking parabola, 32 s per century²
 *    (Morrison & Stephenson 2004). One sigma σ(n) = 0.1 + 0.5·n + 0.005·n² s: 0.6 s a year ahead,
 *    about three times the USNO's own prediction error at one to two years (0.1–0.3 s), so that
 *    a contact-time uncertainty built on it errs on the wide side.
 *    ΔT from this model turns into UT1 − UTC = (TT − UTC) − ΔT, which it keeps within the ±0.9 s
 *    that leap seconds guarantee for some years; see timeScales.ts.
 */

export interface DeltaTEstimate {
  /** ΔT = TT − UT1, seconds. */
  deltaTSec: number
  /** One-sigma uncertainty of ΔT, seconds. */
  sigmaSec: number
  /** Which part of the model produced the value. */
  basis: 'observed' | 'predicted' | 'historical-polynomial'
  /** Where the value comes from, in words. */
  source: string
}

const MONTH_MS = (i: number) => Date.UTC(MONTHLY_FIRST[0], MONTHLY_FIRST[1] - 1 + i, 1)
const FIRST_MONTHLY_MS = MONTH_MS(0)
const LAST_INDEX = MONTHLY.length - 1
const LAST_MONTHLY_MS = MONTH_MS(LAST_INDEX)
const LAST_ISO = new Date(LAST_MONTHLY_MS).toISOString().slice(0, 10)
/** The last observed value, its date, and the mean rate over the twelve months before it (s/yr). */
export const LAST_OBSERVED = {
  utcMs: LAST_MONTHLY_MS,
  date: LAST_ISO,
  deltaTSec: MONTHLY[LAST_INDEX]!,
  ratePerYear: MONTHLY[LAST_INDEX]! - MONTHLY[LAST_INDEX - 12]!,
}

const YEAR_MS = 365.25 * 86_400_000

/** Decimal year of a UTC instant in ms since the Unix epoch. */
export function decimalYear(utcMs: number): number {
  const d = new Date(utcMs)
  const y = d.getUTCFullYear()
  const start = Date.UTC(y, 0, 1)
  const end = Date.UTC(y + 1, 0, 1)
  return y + (utcMs - start) / (end - start)
}

/** UTC ms of a decimal year (inverse of {@link decimalYear}). */
function msOfDecimalYear(year: number): number {
  const y = Math.floor(year)
  const start = Date.UTC(y, 0, 1)
  return start + (year - y) * (Date.UTC(y + 1, 0, 1) - start)
}

function parabola(year: number): number {
  const u = (year - 1820) / 100
  return -20 + 32 * u * u
}

/** Default ΔT at a UTC instant (ms since the Unix epoch). */
export function deltaTAt(utcMs: number): DeltaTEstimate {
  if (utcMs > LAST_MONTHLY_MS) {
    const n = (utcMs - LAST_MONTHLY_MS) / YEAR_MS
    const v = LAST_OBSERVED.deltaTSec + LAST_OBSERVED.ratePerYear * Math.min(n, 2) + 0.0032 * n * n
    return {
      deltaTSec: v, sigmaSec: 0.1 + 0.5 * n + 0.005 * n * n, basis: 'predicted',
      source: `predicted from the last USNO value (${LAST_ISO}, ${LAST_OBSERVED.deltaTSec.toFixed(2)} s) and its recent drift`,
    }
  }
  if (utcMs >= FIRST_MONTHLY_MS) {
    const approx = Math.floor((utcMs - FIRST_MONTHLY_MS) / (30.44 * 86_400_000))
    let i = Math.max(0, Math.min(LAST_INDEX - 1, approx))
    while (i > 0 && MONTH_MS(i) > utcMs) i--
    while (i < LAST_INDEX - 1 && MONTH_MS(i + 1) <= utcMs) i++
    const a = MONTH_MS(i), b = MONTH_MS(i + 1)
    const v = MONTHLY[i]! + ((MONTHLY[i + 1]! - MONTHLY[i]!) * (utcMs - a)) / (b - a)
    return { deltaTSec: v, sigmaSec: 0.1, basis: 'observed', source: 'USNO monthly ΔT (deltat.data), interpolated' }
  }
  const year = decimalYear(utcMs)
  if (year >= HISTORIC_FIRST_YEAR) {
    // Half-yearly values up to 1972.5, then the first monthly value (1973-02-01) closes the gap.
    const k = (year - HISTORIC_FIRST_YEAR) * 2
    const i = Math.min(Math.floor(k), HISTORIC_HALF_YEARLY.length - 1)
    const v0 = HISTORIC_HALF_YEARLY[i]!
    const hasNext = i + 1 < HISTORIC_HALF_YEARLY.length
    const v1 = hasNext ? HISTORIC_HALF_YEARLY[i + 1]! : MONTHLY[0]!
    const y0 = HISTORIC_FIRST_YEAR + i / 2
    const y1 = hasNext ? y0 + 0.5 : decimalYear(FIRST_MONTHLY_MS)
    const v = v0 + ((v1 - v0) * (year - y0)) / (y1 - y0)
    return { deltaTSec: v, sigmaSec: year >= 1955.5 ? 0.1 : 0.5, basis: 'observed', source: 'USNO historic ΔT (historic_deltat.data), interpolated' }
  }
  if (year >= 1600) {
    // Espenak & Meeus (2006), "Polynomial expressions for Delta T", 1600–1700.
    const t = year - 1600
    return {
      deltaTSec: 120 - 0.9808 * t - 0.01532 * t * t + (t ** 3) / 7129, sigmaSec: 5, basis: 'historical-polynomial',
      source: 'Espenak & Meeus (2006) polynomial',
    }
  }
  const n = 1600 - year
  return {
    deltaTSec: parabola(year), sigmaSec: 5 + 0.05 * n + 0.0005 * n * n, basis: 'historical-polynomial',
    source: 'Morrison & Stephenson (2004) parabola',
  }
}

/** Default ΔT for a decimal year. */
export function deltaTForYear(year: number): DeltaTEstimate {
  return deltaTAt(msOfDecimalYear(year))
}
