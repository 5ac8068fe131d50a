import { find as findZone } from 'geo-tz'
import type { Kysely } from 'kysely'
import type { BesselianElements } from '../../shared/eclipse/types'
import { NO_CLIMATOLOGY, type SiteCloud, type SiteCreateInput, type SiteMetrics, type SiteOut, type SitePatchInput } from '../../shared/schemas/sites'
import { isAutomaticSiteName } from '../../shared/sites/names'
import { localTime } from '../../shared/time/local'
import type { Database, SiteRow, User } from '../database/schema'
import { localReport } from '../eclipse/report'
import { audit } from './audit'
import { cloudLookupFor, cloudWeightsOf } from './climatology'
import { elementsInForce } from './eclipses'
import { siteHorizon, terrainFor, type Terrain } from './terrain'
import { nowIso } from './clock'

export type { SiteRow } from '../database/schema'
export type { CloudLookup } from './climatology'
export { NO_CLIMATOLOGY }
export type { SiteCloud, SiteMetrics, SiteOut }

export const LOW_SUN_DEG = 15

/** IANA zone of a point (geo-tz; nautical Etc/GMT±n zones offshore). */
export function zoneAt(lat: number, lon: number): string {
  return findZone(lat, lon)[0] ?? 'Etc/UTC'
}

export function siteMetrics(eclipseId: string, el: BesselianElements, deltaT: number | null, s: Pick<SiteRow, 'lat' | 'lon' | 'elevation_m'>, cloud: SiteCloud,
  terrain: Terrain | null = null): SiteMetrics {
  const r = localReport(eclipseId, el, { latDeg: s.lat, lonDeg: s.lon, elevationM: s.elevation_m }, deltaT)
  const zone = zoneAt(s.lat, s.lon)
  const c2 = r.c2 ? localTime(Date.parse(r.c2.utc), zone) : null
  const expectedSec = cloud.pClear === null ? null : Math.round(r.durationSec * cloud.pClear * 10) / 10
  return {
    type: r.type,
    centrelineDistanceKm: r.centrelineDistanceKm,
    halfWidthFraction: r.halfWidthFraction,
    limitDistanceKm: r.limitDistanceKm,
    durationSec: r.durationSec,
    magnitude: r.magnitude,
    c2Utc: r.c2?.utc ?? null,
    c2Local: c2 ? c2.local : null,
    c2UncertaintySec: r.c2?.uncertaintySec ?? null,
    zone,
    utcOffset: c2?.utcOffset ?? (r.max ? localTime(Date.parse(r.max.utc), zone).utcOffset : null),
    sunAltitudeDeg: r.max?.apparentAltitudeDeg ?? null,
    sunAzimuthDeg: r.max?.azimuthDeg ?? null,
    lowSun: r.max ? r.max.apparentAltitudeDeg < LOW_SUN_DEG : false,
    ...cloud,
    expectedSec,
    horizon: siteHorizon(terrain, el, r, { lat: s.lat, lon: s.lon, elevationM: s.elevation_m }),
  }
}

export function siteOut(row: SiteRow, metrics: SiteMetrics): SiteOut {
  return {
    id: row.id, workspaceId: row.workspace_id, name: row.name, lat: row.lat, lon: row.lon,
    elevationM: row.elevation_source ? row.elevation_m : null, elevationSource: row.elevation_source ?? null,
    assumedElevationM: row.elevation_source ? row.elevation_m : 0, nameAutomatic: !!row.name_auto,
    notes: row.notes, roadAccess: row.road_access, capacity: row.capacity, crossesBorder: !!row.crosses_border,
    pinned: !!row.pinned, cloudOverridePct: row.cloud_override_pct ?? null, cloudOverrideNote: row.cloud_override_note ?? null, metrics,
  }
}

export class NotFoundError extends Error {}

/**
 * Guides' reach: a guide sees the planning workspaces of the trips they guide, and nothing else;
 * organisers see all. Someone else's workspace is a 404, like any row the caller may not see.
 */
const guidedWorkspaceIds = (db: Kysely<Database>, userId: number) =>
  db.selectFrom('trips').innerJoin('trip_guides', 'trip_guides.trip_id', 'trips.id').select('trips.workspace_id').where('trip_guides.user_id', '=', userId)

export async function assertWorkspaceAccess(db: Kysely<Database>, user: User, workspaceId: number): Promise<void> {
  if (user.role === 'organiser') return
  const mine = await guidedWorkspaceIds(db, user.id).where('trips.workspace_id', '=', workspaceId).executeTakeFirst()
  if (!mine) throw new NotFoundError('No such planning workspace')
}

export async function listWorkspaces(db: Kysely<Database>, user: User) {
  let q = db.selectFrom('workspaces').selectAll().orderBy('eclipse_id').orderBy('name')
  if (user.role !== 'organiser') q = q.where('id', 'in', guidedWorkspaceIds(db, user.id))
  const rows = await q.execute()
  return rows.map((w) => ({ id: w.id, eclipseId: w.eclipse_id, name: w.name, createdAt: w.created_at }))
}

export async function getWorkspace(db: Kysely<Database>, id: number) {
  const w = await db.selectFrom('workspaces').selectAll().where('id', '=', id).executeTakeFirst()
  if (!w) throw new NotFoundError('No such planning workspace')
  return w
}

export async function createWorkspace(db: Kysely<Database>, user: User, input: { eclipseId: string; name: string }) {
  await elementsInForce(db, input.eclipseId) // 400 for an unknown eclipse
  return db.transaction().execute(async (trx) => {
    const w = await trx.insertInto('workspaces').values({ eclipse_id: input.eclipseId, name: input.name, created_by: user.id })
      .returningAll().executeTakeFirstOrThrow()
    await audit(trx, { action: 'workspace_create', actorUserId: user.id, detail: { workspaceId: w.id, eclipseId: w.eclipse_id } })
    return { id: w.id, eclipseId: w.eclipse_id, name: w.name }
  })
}

/** Everything needed to compute metrics for a workspace's sites, cloud figures included. */
export async function workspaceContext(db: Kysely<Database>, workspaceId: number) {
  const ws = await getWorkspace(db, workspaceId)
  const { el, deltaTOverride } = await elementsInForce(db, ws.eclipse_id)
  return { ws, el, deltaT: deltaTOverride, cloud: await cloudLookupFor(db, ws), terrain: await terrainFor(db, workspaceId) }
}

export async function listSites(db: Kysely<Database>, workspaceId: number): Promise<SiteOut[]> {
  const ctx = await workspaceContext(db, workspaceId)
  const rows = await db.selectFrom('sites').selectAll().where('workspace_id', '=', workspaceId).orderBy('id').execute()
  return rows.map((r) => siteOut(r, siteMetrics(ctx.ws.eclipse_id, ctx.el, ctx.deltaT, r, ctx.cloud(r), ctx.terrain)))
}

function toValues(input: SiteCreateInput | SitePatchInput) {
  const v: Record<string, unknown> = {}
  if (input.name !== undefined) { v.name = input.name; v.name_auto = isAutomaticSiteName(input.name) ? 1 : 0 }
  if (input.lat !== undefined) v.lat = input.lat
  if (input.lon !== undefined) v.lon = input.lon
  if (input.elevationM !== undefined) {
    // null marks the height "not set" again: contacts then assume sea level.
    v.elevation_m = input.elevationM ?? 0
    v.elevation_source = input.elevationM === null ? null : 'given'
  }
  if (input.notes !== undefined) v.notes = input.notes
  if (input.roadAccess !== undefined) v.road_access = input.roadAccess
  if (input.capacity !== undefined) v.capacity = input.capacity
  if (input.crossesBorder !== undefined) v.crosses_border = input.crossesBorder ? 1 : 0
  if ('pinned' in input && input.pinned !== undefined) v.pinned = input.pinned ? 1 : 0
  if ('cloudOverridePct' in input && input.cloudOverridePct !== undefined) {
    v.cloud_override_pct = input.cloudOverridePct
    v.cloud_override_note = input.cloudOverridePct === null ? null : input.cloudOverrideNote ?? null
  }
  return v
}

export async function createSite(db: Kysely<Database>, user: User, workspaceId: number, input: SiteCreateInput): Promise<number> {
  await getWorkspace(db, workspaceId)
  const r = await db.insertInto('sites').values({ workspace_id: workspaceId, name: input.name, lat: input.lat, lon: input.lon, ...toValues(input) } as never)
    .returning('id').executeTakeFirstOrThrow()
  return r.id
}

/** Inserts all rows or none. */
export async function importSites(db: Kysely<Database>, user: User, workspaceId: number, rows: SiteCreateInput[]): Promise<number> {
  await getWorkspace(db, workspaceId)
  return db.transaction().execute(async (trx) => {
    for (const input of rows) {
      await trx.insertInto('sites').values({ workspace_id: workspaceId, name: input.name, lat: input.lat, lon: input.lon, ...toValues(input) } as never).execute()
    }
    await audit(trx, { action: 'sites_import', actorUserId: user.id, detail: { workspaceId, count: rows.length } })
    return rows.length
  })
}

export async function updateWorkspace(db: Kysely<Database>, user: User, id: number, patch: { name?: string; climatologyId?: number | null; cloudWeights?: { scattered: number; broken: number } | null }) {
  await getWorkspace(db, id)
  if (patch.climatologyId) {
    const d = await db.selectFrom('climatology_datasets').select('id').where('id', '=', patch.climatologyId).executeTakeFirst()
    if (!d) throw new NotFoundError('No such climatology dataset')
  }
  await db.transaction().execute(async (trx) => {
    const set: Record<string, unknown> = {}
    if (patch.name !== undefined) set.name = patch.name
    if (patch.climatologyId !== undefined) set.climatology_id = patch.climatologyId
    if (patch.cloudWeights !== undefined) {
      set.cloud_weight_scattered = patch.cloudWeights?.scattered ?? null
      set.cloud_weight_broken = patch.cloudWeights?.broken ?? null
    }
    if (Object.keys(set).length) await trx.updateTable('workspaces').set(set).where('id', '=', id).execute()
    await audit(trx, { action: 'workspace_update', actorUserId: user.id, detail: { workspaceId: id, ...patch } })
  })
  const w = await getWorkspace(db, id)
  return { id: w.id, eclipseId: w.eclipse_id, name: w.name, climatologyId: w.climatology_id, cloudWeights: cloudWeightsOf(w) }
}

export async function getSite(db: Kysely<Database>, id: number): Promise<SiteRow> {
  const s = await db.selectFrom('sites').selectAll().where('id', '=', id).executeTakeFirst()
  if (!s) throw new NotFoundError('No such site')
  return s
}

export async function updateSite(db: Kysely<Database>, id: number, patch: SitePatchInput): Promise<void> {
  const before = await getSite(db, id)
  const v = toValues(patch)
  // Saving the form with the name unchanged keeps whatever the name was.
  if (patch.name !== undefined && patch.name === before.name) { delete v.name; delete v.name_auto }
  if (Object.keys(v).length === 0) return
  await db.updateTable('sites').set({ ...v, updated_at: nowIso() } as never).where('id', '=', id).execute()
}

/** A site that a trip uses cannot be deleted: the trip would lose its timetable. */
export class SiteInUseError extends Error {
  constructor(public tripTitle: string) { super(`This site is used by the trip "${tripTitle}"; change the trip's sites first`) }
}

export async function deleteSite(db: Kysely<Database>, id: number): Promise<void> {
  await db.transaction().execute(async (trx) => {
    const used = await trx.selectFrom('trips').select('title').where('primary_site_id', '=', id)
      .union(trx.selectFrom('trips').innerJoin('trip_backup_sites', 'trip_backup_sites.trip_id', 'trips.id').select('trips.title').where('trip_backup_sites.site_id', '=', id))
      .executeTakeFirst()
    if (used) throw new SiteInUseError(used.title)
    const r = await trx.deleteFrom('sites').where('id', '=', id).executeTakeFirst()
    if (!r.numDeletedRows) throw new NotFoundError('No such site')
  })
}

export async function siteWithMetrics(db: Kysely<Database>, id: number): Promise<SiteOut> {
  const row = await getSite(db, id)
  const ctx = await workspaceContext(db, row.workspace_id)
  return siteOut(row, siteMetrics(ctx.ws.eclipse_id, ctx.el, ctx.deltaT, row, ctx.cloud(row), ctx.terrain))
}
