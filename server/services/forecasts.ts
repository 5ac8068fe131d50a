import type { Kysely } from 'kysely'
import { haversineKm } from '../../shared/geo/distance'
import type { OutlookSiteInput } from '../../shared/schemas/outlook'
import type { Database, User } from '../database/schema'
import { localReport } from '../eclipse/report'
import { audit } from './audit'
import { cloudLookupFor } from './climatology'
import { businessDate, nowIso, nowMs } from './clock'
import { elementsInForce } from './eclipses'
import { fetchCloudSeries, ForecastUnavailableError, valueAt } from './forecastClient'
import { getWorkspace, NotFoundError } from './planning'
import { siteHorizon, terrainFor } from './terrain'
import { assertTimetableAccess } from './timetable'
import { getTripRow, type TripRow } from './trips'

export { ForecastUnavailableError }

/** Forecasts are fetched and the outlook opens from this many days before the eclipse's date. */
export const OUTLOOK_WINDOW_DAYS = 7
/** The schedule fetches each open trip's forecast this often (and once at start-up). */
export const FETCH_EVERY_MS = 3_600_000
/**
 * Road distance ≈ straight-line distance × 1.3 (a detour or circuity factor; factors of about 1.2–1.4
 * are common practice for road networks), driven at 60 km/h on average (our own assumption for
 * mixed roads with a group). Used only where the organiser has not entered a drive time.
 */
export const ROAD_FACTOR = 1.3
export const ROAD_SPEED_KMH = 60
/**
 * Blend of forecast and climatology (our own heuristic, not a published method): the forecast's
 * weight falls in a straight line from 1 at zero lead time to 0 at 240 h (10 days), about where
 * day-to-day forecasts are usually taken to have no more skill than climatology.
 */
export const FORECAST_SKILL_HOURS = 240

const DAY_MS = 86_400_000
const HOUR_MS = 3_600_000
const r1 = (v: number) => Math.round(v * 10) / 10
const addDays = (date: string, days: number) => new Date(Date.parse(`${date}T00:00:00Z`) + days * DAY_MS).toISOString().slice(0, 10)

/** The outlook is not open yet: `daysToWait` whole days until `opensOn` (UTC date). */
export class TooEarlyError extends Error {
  constructor(public daysToWait: number, public opensOn: string) {
    super(`The forecast outlook opens ${OUTLOOK_WINDOW_DAYS} days before the eclipse, on ${opensOn}: ${daysToWait} day${daysToWait === 1 ? '' : 's'} to wait`)
  }
}

/**
 * "Now" for forecasts: the app's clock, on the business date when that is pinned
 * (UMBRAFIELD_FIXED_DATE, local apps only) — the pinned day at the clock's time of day — so a demo
 * pinned to the eclipse week sees sensible lead times.
 */
export function forecastNowMs(): number {
  const now = nowMs()
  const day = businessDate(now)
  const clockDay = new Date(now).toISOString().slice(0, 10)
  return day === clockDay ? now : Date.parse(`${day}T00:00:00Z`) + (now % DAY_MS)
}

/** Throws TooEarlyError while the eclipse is more than seven days ahead of the business date. */
export function assertOutlookOpen(eclipseId: string): void {
  const today = businessDate()
  const opensOn = addDays(eclipseId, -OUTLOOK_WINDOW_DAYS)
  if (today < opensOn) throw new TooEarlyError(Math.round((Date.parse(opensOn) - Date.parse(today)) / DAY_MS), opensOn)
}

/** The forecast's weight in the blend at a lead time (hours), 0–1. */
export function forecastWeight(leadHours: number): number {
  return Math.max(0, Math.min(1, 1 - leadHours / FORECAST_SKILL_HOURS))
}

/** Estimated drive from the meeting point, minutes, from the straight-line distance (see ROAD_FACTOR). */
export function estimatedDriveMinutes(distanceKm: number): number {
  return Math.round((distanceKm * ROAD_FACTOR / ROAD_SPEED_KMH) * 60)
}

type SiteRole = 'primary' | 'fallback' | 'added'

/** The trip's outlook sites in order: primary, fallbacks by rank, then sites added to the outlook. */
async function outlookSites(db: Kysely<Database>, trip: TripRow) {
  const backups = await db.selectFrom('trip_backup_sites').select('site_id').where('trip_id', '=', trip.id).orderBy('rank').execute()
  const extras = await db.selectFrom('outlook_sites').selectAll().where('trip_id', '=', trip.id).orderBy('site_id').execute()
  const order: Array<{ id: number; role: SiteRole }> = [{ id: trip.primary_site_id, role: 'primary' }, ...backups.map((b) => ({ id: b.site_id, role: 'fallback' as const }))]
  for (const e of extras) if (!order.some((o) => o.id === e.site_id)) order.push({ id: e.site_id, role: 'added' })
  const rows = await db.selectFrom('sites').selectAll().where('id', 'in', order.map((o) => o.id)).execute()
  return order.flatMap((o) => {
    const row = rows.find((r) => r.id === o.id)
    if (!row) return []
    return [{ row, role: o.role, enteredDriveMinutes: extras.find((e) => e.site_id === o.id)?.drive_minutes ?? null }]
  })
}

/** Local circumstances of each outlook site, from the engine the timetable uses (elements in force, terrain, climatology). */
async function siteCircumstances(db: Kysely<Database>, trip: TripRow) {
  const sites = await outlookSites(db, trip)
  const { el, deltaTOverride } = await elementsInForce(db, trip.eclipse_id)
  const cloud = await cloudLookupFor(db, await getWorkspace(db, trip.workspace_id))
  const terrain = await terrainFor(db, trip.workspace_id)
  return sites.map((s) => {
    const r = localReport(trip.eclipse_id, el, { latDeg: s.row.lat, lonDeg: s.row.lon, elevationM: s.row.elevation_m }, deltaTOverride)
    const h = siteHorizon(terrain, el, r, { lat: s.row.lat, lon: s.row.lon, elevationM: s.row.elevation_m }, { profile: false })
    // Clear when the whole disc stands above the terrain at C2, maximum and C3 (those the site has); null without a terrain model.
    const terrainClear = h ? [h.c2, h.max, h.c3].every((c) => !c || c.clear) : null
    return {
      ...s, durationSec: r.durationSec, maxUtc: r.max?.utc ?? null, c2Utc: r.c2?.utc ?? null,
      sunAltitudeDeg: r.max ? r.max.apparentAltitudeDeg : null, terrainClear, pClearClimatology: cloud(s.row).pClear,
    }
  })
}

/**
 * Fetches the forecast for every outlook site of a trip and keeps it as a new run (one transaction).
 * Values are interpolated to each site's time of maximum. Returns the run's id.
 */
export async function fetchForecastRun(db: Kysely<Database>, baseUrl: string, tripId: number, cause: 'schedule' | 'startup' | 'manual', by: User | null = null): Promise<number> {
  const trip = await getTripRow(db, tripId)
  const sites = (await siteCircumstances(db, trip)).filter((s) => s.maxUtc)
  const maxMs = sites.map((s) => Date.parse(s.maxUtc!))
  const day = (ms: number) => new Date(ms).toISOString().slice(0, 10)
  // Whole UTC days around every site's maximum (one day either side, so an hour on both sides of each is there).
  const startDate = maxMs.length ? addDays(day(Math.min(...maxMs)), -1) : trip.eclipse_id
  const endDate = maxMs.length ? addDays(day(Math.max(...maxMs)), 1) : trip.eclipse_id
  const series = await fetchCloudSeries(baseUrl, sites.map((s) => ({ lat: s.row.lat, lon: s.row.lon })), startDate, endDate)
  const fetchedAt = new Date(forecastNowMs()).toISOString()
  return db.transaction().execute(async (trx) => {
    const run = await trx.insertInto('forecast_runs').values({ trip_id: trip.id, fetched_at: fetchedAt, cause, requested_by: by?.id ?? null })
      .returning('id').executeTakeFirstOrThrow()
    for (const [i, s] of sites.entries()) {
      const x = series[i]!
      const at = (v: number[]) => valueAt(x.startMs, x.intervalSec, v, maxMs[i]!)
      const total = at(x.total), low = at(x.low), mid = at(x.mid), high = at(x.high)
      if (total === null || low === null || mid === null || high === null) continue
      await trx.insertInto('forecast_values').values({
        run_id: run.id, site_id: s.row.id, max_utc: s.maxUtc!, cloud_pct: r1(total), low_pct: r1(low), mid_pct: r1(mid), high_pct: r1(high),
        hourly: JSON.stringify({ startUtc: new Date(x.startMs).toISOString(), intervalSec: x.intervalSec, total: x.total, low: x.low, mid: x.mid, high: x.high }),
      }).execute()
    }
    if (by) await audit(trx, { action: 'forecast.refresh', actorUserId: by.id, detail: { tripId: trip.id, runId: run.id } })
    return run.id
  })
}

/** An organiser's "fetch now": only while the outlook is open. */
export async function refreshOutlook(db: Kysely<Database>, baseUrl: string, user: User, tripId: number) {
  const trip = await getTripRow(db, tripId)
  assertOutlookOpen(trip.eclipse_id)
  const runId = await fetchForecastRun(db, baseUrl, trip.id, 'manual', user)
  const run = await db.selectFrom('forecast_runs').selectAll().where('id', '=', runId).executeTakeFirstOrThrow()
  return { runId, fetchedAt: run.fetched_at }
}

/**
 * The housekeeping job: fetches the forecast of every trip whose eclipse is today or within the
 * next seven days, when its last run is an hour old or more (or at once, `force`, at start-up).
 * One trip's failure does not stop the others. Returns the runs made.
 */
export async function fetchDueForecasts(db: Kysely<Database>, baseUrl: string, opts: { force?: boolean } = {}): Promise<number[]> {
  const now = forecastNowMs()
  const today = businessDate()
  const trips = await db.selectFrom('trips').select(['id', 'eclipse_id'])
    .where('eclipse_id', '>=', today).where('eclipse_id', '<=', addDays(today, OUTLOOK_WINDOW_DAYS)).orderBy('id').execute()
  const made: number[] = []
  for (const t of trips) {
    const last = await db.selectFrom('forecast_runs').select('fetched_at').where('trip_id', '=', t.id).orderBy('fetched_at', 'desc').orderBy('id', 'desc').executeTakeFirst()
    // |…|: on a pinned date the time of day wraps at midnight, so "an hour apart" either way counts.
    if (!opts.force && last && Math.abs(now - Date.parse(last.fetched_at)) < FETCH_EVERY_MS) continue
    try {
      made.push(await fetchForecastRun(db, baseUrl, t.id, opts.force ? 'startup' : 'schedule'))
    } catch (e) {
      console.error(`[umbrafield] forecast for trip ${t.id}:`, (e as Error).message)
    }
  }
  return made
}

/** Adds a workspace site to the outlook or sets its drive time (organisers). */
export async function setOutlookSite(db: Kysely<Database>, user: User, tripId: number, siteId: number, input: OutlookSiteInput) {
  const trip = await getTripRow(db, tripId)
  const site = await db.selectFrom('sites').select(['id', 'workspace_id']).where('id', '=', siteId).executeTakeFirst()
  if (!site || site.workspace_id !== trip.workspace_id) throw new NotFoundError('No such site in this trip\'s workspace')
  const isTripSite = siteId === trip.primary_site_id
    || !!(await db.selectFrom('trip_backup_sites').select('site_id').where('trip_id', '=', tripId).where('site_id', '=', siteId).executeTakeFirst())
  const values = { extra: isTripSite ? 0 : 1, drive_minutes: input.driveMinutes, updated_at: nowIso() }
  await db.insertInto('outlook_sites').values({ trip_id: tripId, site_id: siteId, ...values })
    .onConflict((oc) => oc.columns(['trip_id', 'site_id']).doUpdateSet(values)).execute()
  await audit(db, { action: 'outlook.site', actorUserId: user.id, detail: { tripId, siteId, driveMinutes: input.driveMinutes } })
  return { tripId, siteId, added: !isTripSite, driveMinutes: input.driveMinutes }
}

/** Takes an added site off the outlook, or clears an entered drive time (organisers). */
export async function removeOutlookSite(db: Kysely<Database>, user: User, tripId: number, siteId: number) {
  await getTripRow(db, tripId)
  const r = await db.deleteFrom('outlook_sites').where('trip_id', '=', tripId).where('site_id', '=', siteId).executeTakeFirst()
  const removed = Number(r.numDeletedRows) > 0
  if (removed) await audit(db, { action: 'outlook.site.remove', actorUserId: user.id, detail: { tripId, siteId } })
  return { tripId, siteId, removed }
}

export interface OutlookSiteRun { runId: number; fetchedAt: string; cloudCoverPct: number; lowPct: number; midPct: number; highPct: number }

/** One site of the outlook (percent, seconds, degrees, km, minutes; times UTC ISO). */
export interface OutlookSiteOut {
  siteId: number; name: string; role: SiteRole; lat: number; lon: number
  /** The latest run's cloud at the site's maximum (interpolated between hours); null before any run. */
  cloudCoverPct: number | null; lowPct: number | null; midPct: number | null; highPct: number | null
  /** Latest minus the previous run, percentage points. */
  trendPct: number | null
  pClearClimatology: number | null; durationSec: number; sunAltitudeDeg: number | null; terrainClear: boolean | null
  distanceKm: number; driveMinutes: number; driveSource: 'entered' | 'estimated'; arrivalUtc: string
  c2Utc: string | null; maxUtc: string | null; reachable: boolean; recommendable: boolean
  leadHours: number | null; forecastWeight: number; expectedSec: number | null; rank: number; runs: OutlookSiteRun[]
}

/**
 * The outlook (organisers and the trip's guides, from seven days before the eclipse): every outlook
 * site with the latest forecast at its maximum, the change since the previous run, climatology,
 * duration, Sun and terrain, the drive from the meeting point, expected seen seconds, a rank and a
 * recommendation. See the README ("Forecast outlook") for the method.
 */
export async function outlook(db: Kysely<Database>, user: User, tripId: number) {
  const trip = await assertTimetableAccess(db, user, tripId)
  assertOutlookOpen(trip.eclipse_id)
  const sites = await siteCircumstances(db, trip)
  const runs = await db.selectFrom('forecast_runs').selectAll().where('trip_id', '=', trip.id).orderBy('fetched_at').orderBy('id').execute()
  const values = runs.length
    ? await db.selectFrom('forecast_values').select(['run_id', 'site_id', 'cloud_pct', 'low_pct', 'mid_pct', 'high_pct']).where('run_id', 'in', runs.map((r) => r.id)).execute()
    : []
  const latest = runs.at(-1) ?? null
  const previous = runs.at(-2) ?? null
  const valueOf = (runId: number | undefined, siteId: number) => values.find((v) => v.run_id === runId && v.site_id === siteId) ?? null
  const meetingMs = Date.parse(trip.meeting_time_utc)

  const out: OutlookSiteOut[] = sites.map((s) => {
    const now = valueOf(latest?.id, s.row.id)
    const before = valueOf(previous?.id, s.row.id)
    const history: OutlookSiteRun[] = runs.flatMap((run) => {
      const v = valueOf(run.id, s.row.id)
      return v ? [{ runId: run.id, fetchedAt: run.fetched_at, cloudCoverPct: v.cloud_pct, lowPct: v.low_pct, midPct: v.mid_pct, highPct: v.high_pct }] : []
    })
    const leadHours = now && latest && s.maxUtc ? r1((Date.parse(s.maxUtc) - Date.parse(latest.fetched_at)) / HOUR_MS) : null
    const pClim = s.pClearClimatology
    // Without a forecast the climatology stands alone; without a climatology the forecast does.
    const weight = now && leadHours !== null ? (pClim === null ? 1 : forecastWeight(leadHours)) : 0
    const pForecast = now ? 1 - now.cloud_pct / 100 : null
    const pBlend = pForecast === null ? pClim : pClim === null ? pForecast : weight * pForecast + (1 - weight) * pClim
    const expectedSec = pBlend === null ? null : r1(s.durationSec * pBlend)
    const distanceKm = r1(haversineKm(trip.meeting_lat, trip.meeting_lon, s.row.lat, s.row.lon))
    const driveMinutes = s.enteredDriveMinutes ?? estimatedDriveMinutes(distanceKm)
    const arrivalMs = meetingMs + driveMinutes * 60_000
    // The group must be there by second contact (by maximum where the site has no C2).
    const deadline = s.c2Utc ?? s.maxUtc
    const reachable = deadline !== null && arrivalMs <= Date.parse(deadline)
    const recommendable = reachable && s.durationSec > 0 && s.terrainClear !== false && expectedSec !== null
    return {
      siteId: s.row.id, name: s.row.name, role: s.role, lat: s.row.lat, lon: s.row.lon,
      cloudCoverPct: now?.cloud_pct ?? null, lowPct: now?.low_pct ?? null, midPct: now?.mid_pct ?? null, highPct: now?.high_pct ?? null,
      trendPct: now && before ? r1(now.cloud_pct - before.cloud_pct) : null,
      pClearClimatology: pClim, durationSec: s.durationSec, sunAltitudeDeg: s.sunAltitudeDeg, terrainClear: s.terrainClear,
      distanceKm, driveMinutes, driveSource: s.enteredDriveMinutes === null ? 'estimated' : 'entered',
      arrivalUtc: new Date(arrivalMs).toISOString(), c2Utc: s.c2Utc, maxUtc: s.maxUtc, reachable, recommendable,
      leadHours, forecastWeight: r1(weight * 100) / 100, expectedSec, rank: 0, runs: history,
    }
  })
  // Recommendable sites first, then by expected seen seconds, duration, and the shorter drive.
  out.sort((a, b) => Number(b.recommendable) - Number(a.recommendable) || (b.expectedSec ?? -1) - (a.expectedSec ?? -1)
    || b.durationSec - a.durationSec || a.driveMinutes - b.driveMinutes)
  out.forEach((s, i) => { s.rank = i + 1 })
  return {
    generatedAt: nowIso(),
    trip: { id: trip.id, title: trip.title, eclipseId: trip.eclipse_id, meetingPoint: { name: trip.meeting_name, lat: trip.meeting_lat, lon: trip.meeting_lon, timeUtc: trip.meeting_time_utc } },
    forecastRun: latest ? { id: latest.id, fetchedAt: latest.fetched_at, cause: latest.cause, previousFetchedAt: previous?.fetched_at ?? null, runs: runs.length } : null,
    sites: out,
    recommendation: recommend(out),
    method: {
      expectedSec: 'durationSec × P(clear), P(clear) = w × (1 − cloudCoverPct/100) + (1 − w) × pClearClimatology',
      forecastWeight: `w = max(0, 1 − lead hours / ${FORECAST_SKILL_HOURS}); our own heuristic blend, not a published method`,
      drive: `entered per site, or straight-line distance × ${ROAD_FACTOR} at ${ROAD_SPEED_KMH} km/h`,
      reachable: 'arrival (meeting time + drive) no later than C2',
    },
  }
}

/**
 * The site to go to: the best-ranked recommendable one. Confidence (our own rule of thumb): high
 * when the forecast carries most of the weight (w ≥ 0.6) and the lead over the next site is at least
 * a fifth of the duration; low when the forecast weighs little (w < 0.3), is missing, or the lead is
 * under 5 % of the duration; medium otherwise.
 */
function recommend(sites: OutlookSiteOut[]): { siteId: number | null; confidence: 'high' | 'medium' | 'low' | 'none'; reason: string } {
  const ok = sites.filter((s) => s.recommendable)
  const best = ok[0]
  if (!best) return { siteId: null, confidence: 'none', reason: 'No site can be reached before C2 with the Sun clear of the terrain and a figure for the sky.' }
  const next = ok[1]
  const leadSec = best.expectedSec! - (next?.expectedSec ?? 0)
  const leadFraction = best.durationSec > 0 ? leadSec / best.durationSec : 0
  const w = best.forecastWeight
  const confidence = best.cloudCoverPct === null || w < 0.3 || leadFraction < 0.05 ? 'low'
    : w >= 0.6 && leadFraction >= 0.2 ? 'high' : 'medium'
  const sky = best.cloudCoverPct === null
    ? 'no forecast yet, climatology only'
    : `forecast ${Math.round(best.cloudCoverPct)} % cloud at maximum, ${Math.round(best.leadHours ?? 0)} h ahead`
  const versus = next ? `; next, ${next.name}: ${Math.round(next.expectedSec!)} s` : '; no other site qualifies'
  const unreachable = sites.filter((s) => !s.reachable).length
  return {
    siteId: best.siteId, confidence,
    reason: `${best.name}: ${Math.round(best.expectedSec!)} s of ${Math.round(best.durationSec)} s expected (${sky})${versus}.`
      + (unreachable ? ` ${unreachable} site${unreachable === 1 ? '' : 's'} cannot be reached before C2.` : ''),
  }
}

export type Outlook = Awaited<ReturnType<typeof outlook>>
