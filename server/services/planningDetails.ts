import type { Kysely, Selectable } from 'kysely'
import { greatestEclipse } from '../../shared/eclipse/greatest'
import type { Database, User } from '../database/schema'
import { audit } from './audit'
import { cloudAt, eclipseMonth, monthGrids } from './climatology'
import { elementsInForce } from './eclipses'
import { getSite, siteWithMetrics } from './planning'
import { terrainFor } from './terrain'
import { nowIso } from './clock'

/** A trip's site still has a made-up name (400, field `sites`). */
export class SiteNameAutomaticError extends Error {}

/**
 * A trip is not published while one of its sites still carries a name the planning page made up
 * ("Best ground 1 (…)"): travellers and guides would read it on every timetable and e-mail.
 * A 400 naming the site (field `sites`).
 */
export async function assertSiteNamesChosen(db: Kysely<Database>, tripId: number): Promise<void> {
  const trip = await db.selectFrom('trips').select('primary_site_id').where('id', '=', tripId).executeTakeFirst()
  if (!trip) return
  const backups = db.selectFrom('trip_backup_sites').select('site_id').where('trip_id', '=', tripId)
  const auto = await db.selectFrom('sites').select(['id', 'name'])
    .where((eb) => eb.or([eb('id', '=', trip.primary_site_id), eb('id', 'in', backups)]))
    .where('name_auto', '=', 1).orderBy('id').execute()
  if (!auto.length) return
  const names = auto.map((s) => `"${s.name}"`).join(', ')
  throw new SiteNameAutomaticError(`Rename ${auto.length === 1 ? 'the site' : 'the sites'} ${names} before publishing: ${auto.length === 1 ? 'its name was' : 'their names were'} made up by the planning page.`)
}

/** No height model of the workspace covers the site. */
export class NoTerrainError extends Error {}

/**
 * Sets a site's height from the workspace's terrain model (the ground at the site, whole metres) and
 * marks it as coming from there. A 400 (field `elevationM`) when no model covers the site.
 */
export async function fillHeightFromTerrain(db: Kysely<Database>, user: User, siteId: number) {
  const site = await getSite(db, siteId)
  const terrain = await terrainFor(db, site.workspace_id)
  const ground = terrain?.heightAt(site.lat, site.lon) ?? null
  if (ground === null) {
    throw new NoTerrainError(terrain
      ? `The terrain model "${terrain.name}" does not cover this site: type its height instead.`
      : 'This workspace has no terrain model yet: upload one under Terrain, or type the height.')
  }
  const elevationM = Math.round(ground)
  await db.transaction().execute(async (trx) => {
    await trx.updateTable('sites').set({ elevation_m: elevationM, elevation_source: 'terrain', updated_at: nowIso() }).where('id', '=', siteId).execute()
    await audit(trx, { action: 'site_height_from_terrain', actorUserId: user.id, detail: { siteId, elevationM, terrain: terrain!.name } })
  })
  return siteWithMetrics(db, siteId)
}


const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December']
export const monthName = (m: number) => MONTHS[m - 1] ?? `month ${m}`

/**
 * Whether the workspace's chosen climatology covers its eclipse: the eclipse month, and the ground
 * it plans on (its sites, or the point of greatest eclipse while it has none). One warning naming
 * what is missing, or null; no dataset chosen is not a gap (the cloud panel says so itself).
 */
export async function climatologyCoverage(db: Kysely<Database>, ws: Selectable<Database['workspaces']>) {
  const month = eclipseMonth(ws.eclipse_id)
  const base = { month, monthName: monthName(month) }
  if (!ws.climatology_id) return { ...base, missing: null, warning: null }
  const meta = await db.selectFrom('climatology_datasets').select(['name']).where('id', '=', ws.climatology_id).executeTakeFirst()
  if (!meta) return { ...base, missing: null, warning: null }
  const grids = await monthGrids(db, ws.climatology_id, month)
  if (!grids) {
    const held = (await db.selectFrom('climatology_grids').select('month').where('dataset_id', '=', ws.climatology_id).orderBy('month').execute()).map((r) => monthName(r.month))
    return {
      ...base, missing: 'month' as const,
      warning: `The climatology "${meta.name}" has no data for ${monthName(month)}, the eclipse month (it holds ${held.join(', ') || 'no months'}). `
        + 'Cloud figures are missing, and expected seen seconds fall back to the central duration alone.',
    }
  }
  const sites = await db.selectFrom('sites').select(['name', 'lat', 'lon']).where('workspace_id', '=', ws.id).orderBy('id').execute()
  let points = sites
  if (!points.length) {
    const { el } = await elementsInForce(db, ws.eclipse_id)
    const g = greatestEclipse(el)
    points = [{ name: 'the point of greatest eclipse', lat: g.latDeg, lon: g.lonDeg }]
  }
  const outside = points.filter((p) => cloudAt(grids, p.lat, p.lon).pClear === null)
  if (!outside.length) return { ...base, missing: null, warning: null }
  const names = outside.slice(0, 5).map((p) => p.name).join(', ') + (outside.length > 5 ? ` and ${outside.length - 5} more` : '')
  const all = outside.length === points.length
  return {
    ...base, missing: 'region' as const,
    warning: `The climatology "${meta.name}" has no ${monthName(month)} data ${all ? 'over this workspace\'s region' : 'at some of its sites'} (${names}): `
      + 'those places have no cloud figures.',
  }
}
