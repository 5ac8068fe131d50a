/**
 * ΔT = TT − UT1, in seconds.
 *
 * Model, in order of preference:
 * 1. Observed values at 1 January of each listed year, 1900–2025, interpolated linearly.
 *    Source: IERS / USNO published ΔT series (the yearly values below are quoted from
 *    memory of those tables and rounded to 0.01 s; check against the IERS before relying
 *    on a single year to better than 0.1 s).
 * 2. After the last observation: the last observed value plus the change of the
 *    Morrison & Stephenson (2004) long-term parabola, ΔT = −20 + 32·u², u = (year − 1820)/100,
 *    so the curve is continuous with the observations.
 * 3. 1860–1900: Espenak & Meeus (2006) polynomial, as in the Five Millennium Canon.
 *    Before 1860: the Morrison & Stephenson parabola.
 *
 * The uncertainty grows with the years since the last observation:
 *   σ(n) = 0.5·n + 0.004·n² seconds (n in years), and 0.1 s where observed.
 * The 0.5 s/yr slope is set by how far 2006–2015 forecasts missed the observed 2020–2025
 * values (about 4–5 s after 9–18 years); the quadratic term allows for the tidal trend.
 */

/** [decimal year, ΔT in s] — observed, 1 January of each year. IERS/USNO, from memory. */
const OBSERVED: ReadonlyArray<readonly [number, number]> = [
  [1900, -2.79], [1905, 3.86], [1910, 10.46], [1915, 17.2], [1920, 21.16], [1925, 23.62],
  [1930, 24.02], [1935, 23.93], [1940, 24.33], [1945, 26.77], [1950, 29.15], [1955, 31.07],
  [1960, 33.15], [1965, 35.73], [1970, 40.18], [1975, 45.48], [1980, 50.54], [1985, 54.34],
  [1990, 56.86], [1995, 60.78], [2000, 63.83], [2005, 64.69], [2010, 66.07], [2015, 67.64],
  [2016, 68.1], [2017, 68.59], [2018, 68.97], [2019, 69.22], [2020, 69.36], [2021, 69.36],
  [2022, 69.29], [2023, 69.2], [2024, 69.18], [2025, 69.14],
]

const LAST_OBSERVED_YEAR = OBSERVED[OBSERVED.length - 1]![0]
const FIRST_OBSERVED_YEAR = OBSERVED[0]![0]

function parabola(year: number): number {
  const u = (year - 1820) / 100
  return -20 + 32 * u * u
}

/** Decimal year of a UTC instant in ms since the Unix epoch. */
export function decimalYear(utcMs: number): number {
  const d = new Date(utcMs)
  const y = d.getUTCFullYear()
  const start = Date.UTC(y, 0, 1)
  const end = Date.UTC(y + 1, 0, 1)
  return y + (utcMs - start) / (end - start)
}

export interface DeltaTEstimate {
  /** ΔT = TT − UT1, seconds. */
  deltaTSec: number
  /** One-sigma uncertainty of ΔT, seconds. */
  sigmaSec: number
  /** Which part of the model produced the value. */
  basis: 'observed' | 'extrapolated' | 'historical-polynomial'
}

/** Default ΔT for a decimal year. */
export function deltaTForYear(year: number): DeltaTEstimate {
  if (year >= FIRST_OBSERVED_YEAR && year <= LAST_OBSERVED_YEAR) {
    let i = 0
    while (OBSERVED[i + 1]![0] < year) i++
    const [y0, v0] = OBSERVED[i]!
    const [y1, v1] = OBSERVED[Math.min(i + 1, OBSERVED.length - 1)]!
    const v = y1 === y0 ? v0 : v0 + ((v1 - v0) * (year - y0)) / (y1 - y0)
    return { deltaTSec: v, sigmaSec: 0.1, basis: 'observed' }
  }
  if (year > LAST_OBSERVED_YEAR) {
    const n = year - LAST_OBSERVED_YEAR
    const last = OBSERVED[OBSERVED.length - 1]![1]
    return {
      deltaTSec: last + parabola(year) - parabola(LAST_OBSERVED_YEAR),
      sigmaSec: 0.1 + 0.5 * n + 0.004 * n * n,
      basis: 'extrapolated',
    }
  }
  if (year >= 1860) {
    // Espenak & Meeus (2006), "Polynomial expressions for Delta T", 1860–1900.
    const t = year - 1860
    const v = 7.62 + 0.5737 * t - 0.251754 * t ** 2 + 0.01680668 * t ** 3
      - 0.0004473624 * t ** 4 + t ** 5 / 233174
    return { deltaTSec: v, sigmaSec: 1, basis: 'historical-polynomial' }
  }
  const n = 1860 - year
  return { deltaTSec: parabola(year), sigmaSec: 1 + 0.05 * n + 0.0005 * n * n, basis: 'historical-polynomial' }
}

/** Default ΔT at a UTC instant (ms). */
export function deltaTAt(utcMs: number): DeltaTEstimate {
  return deltaTForYear(decimalYear(utcMs))
}
