import type { ColumnType, Generated } from 'kysely'

/** One fetch of the forecast for every outlook site of a trip; every run is kept, so the outlook can show how it moved. */
export interface ForecastRunsTable {
  id: Generated<number>
  trip_id: number
  /** When the forecast was fetched (UTC ISO, the app's clock): the lead time is counted from here. */
  fetched_at: string
  /** What started it: the hourly schedule, the first fetch after start-up, or an organiser. */
  cause: 'schedule' | 'startup' | 'manual'
  requested_by: number | null
}

/** One site's figures in one run: the hourly series around the eclipse and the values at its maximum. */
export interface ForecastValuesTable {
  run_id: number
  site_id: number
  /** The site's time of maximum eclipse (UTC ISO) the values are interpolated to. */
  max_utc: string
  /** Cloud cover at maximum, percent (total, and the low, mid and high layers). */
  cloud_pct: number
  low_pct: number
  mid_pct: number
  high_pct: number
  /** JSON: { startUtc, intervalSec, total: number[], low: number[], mid: number[], high: number[] } as served. */
  hourly: string
}

/** Sites an organiser added to a trip's outlook, and drive times entered for any outlook site. */
export interface OutlookSitesTable {
  trip_id: number
  site_id: number
  /** 1 when added to the outlook only (not the trip's primary or a fallback). */
  extra: ColumnType<number, number | undefined, number>
  /** Minutes from the meeting point, as entered; null: estimated from the distance. */
  drive_minutes: ColumnType<number | null, number | null | undefined, number | null>
  updated_at: string
}

/** Tables of the forecast outlook. */
export interface ForecastTables {
  forecast_runs: ForecastRunsTable
  forecast_values: ForecastValuesTable
  outlook_sites: OutlookSitesTable
}
