import { fetchWeatherApi } from 'openmeteo'
import { Variable } from '@openmeteo/sdk/variable.js'

/**
 * Hourly cloud forecasts from Open-Meteo's forecast API through its official SDK (FlatBuffers).
 * The base URL is configurable (NUXT_FORECAST_API_URL), so the local fake (fakes/forecast) or a
 * self-hosted instance can stand in for the public service.
 */
export const DEFAULT_FORECAST_API_URL = 'https://api.open-meteo.com/v1/forecast'

/** The variables asked for, in this order (the SDK's answers are read by index, and checked by name). */
export const CLOUD_VARIABLES = ['cloud_cover', 'cloud_cover_low', 'cloud_cover_mid', 'cloud_cover_high'] as const
const EXPECTED = [Variable.cloud_cover, Variable.cloud_cover_low, Variable.cloud_cover_mid, Variable.cloud_cover_high]

/** One location's hourly series: percent per hour from startMs, every intervalSec. */
export interface CloudSeries {
  startMs: number
  intervalSec: number
  total: number[]
  low: number[]
  mid: number[]
  high: number[]
}

export class ForecastUnavailableError extends Error {}

/**
 * Fetches hourly total, low, mid and high cloud cover for every point over whole UTC days
 * [startDate, endDate] (YYYY-MM-DD) in one request (the API takes lists of coordinates and answers
 * one message per location, in order).
 */
export async function fetchCloudSeries(baseUrl: string, points: Array<{ lat: number; lon: number }>, startDate: string, endDate: string): Promise<CloudSeries[]> {
  if (!points.length) return []
  let responses
  try {
    responses = await fetchWeatherApi(baseUrl, {
      latitude: points.map((p) => p.lat.toFixed(4)).join(','),
      longitude: points.map((p) => p.lon.toFixed(4)).join(','),
      hourly: CLOUD_VARIABLES.join(','),
      start_date: startDate,
      end_date: endDate,
      timezone: 'GMT',
    }, 2, 0.2, 1, { signal: AbortSignal.timeout(20_000) })
  } catch (e) {
    throw new ForecastUnavailableError(`The forecast service did not answer: ${(e as Error).message}`)
  }
  if (responses.length !== points.length) throw new ForecastUnavailableError(`The forecast service answered ${responses.length} locations for ${points.length}`)
  return responses.map((r) => {
    const h = r.hourly()
    if (!h) throw new ForecastUnavailableError('The forecast has no hourly data')
    const series = EXPECTED.map((v, i) => {
      const x = h.variables(i)
      if (!x || x.variable() !== v) throw new ForecastUnavailableError(`The forecast's variable ${i} is not ${CLOUD_VARIABLES[i]}`)
      return Array.from(x.valuesArray() ?? [], (n) => (Number.isFinite(n) ? n : Number.NaN))
    })
    return { startMs: Number(h.time()) * 1000, intervalSec: h.interval(), total: series[0]!, low: series[1]!, mid: series[2]!, high: series[3]! }
  })
}

/**
 * A series' value at an instant, linear between the hours either side (percent); null outside the
 * series or where a neighbouring hour has no value.
 */
export function valueAt(startMs: number, intervalSec: number, values: number[], atMs: number): number | null {
  const f = (atMs - startMs) / (intervalSec * 1000)
  if (!(f >= 0) || f > values.length - 1) return null
  const i = Math.floor(f)
  const a = values[i]!, b = values[Math.min(i + 1, values.length - 1)]!
  if (!Number.isFinite(a) || !Number.isFinite(b)) return null
  return a + (b - a) * (f - i)
}
