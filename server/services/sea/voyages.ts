import type { Kysely } from 'kysely'
import type { VoyageCreate } from '../../../shared/schemas/voyages'
import type { Database, User } from '../../database/schema'
import { resolveTimeBasis } from '../../eclipse/report'
import { audit } from '../audit'
import { cloudAt, eclipseMonth, monthGrids } from '../climatology'
import { elementsInForce } from '../eclipses'
import { assertWorkspaceAccess, getWorkspace, NotFoundError } from '../planning'
import { planVoyage, type VoyagePlan } from './voyagePlan'
import { voyageTimetable } from './voyageTimetable'

/** Plans a voyage in a workspace (its eclipse, element set, ΔT and climatology) and stores it. */
export async function createVoyage(db: Kysely<Database>, user: User, workspaceId: number, input: VoyageCreate) {
  const ws = await getWorkspace(db, workspaceId)
  const { el, deltaTOverride } = await elementsInForce(db, ws.eclipse_id)
  const dt = resolveTimeBasis(el, deltaTOverride)
  const grids = ws.climatology_id ? await monthGrids(db, ws.climatology_id, eclipseMonth(ws.eclipse_id)) : null
  const plan = planVoyage(input, {
    el, deltaTSec: dt.deltaTSec, ttMinusClockSec: dt.ttMinusClockSec,
    pClear: grids ? (lat, lon) => cloudAt(grids, lat, lon).pClear : null,
  })
  const row = await db.transaction().execute(async (trx) => {
    const row = await trx.insertInto('voyages').values({
      workspace_id: workspaceId, name: input.name, request: JSON.stringify(input), plan: JSON.stringify(plan), created_by: user.id,
    }).returning(['id', 'created_at']).executeTakeFirstOrThrow()
    await audit(trx, { action: 'voyage_create', actorUserId: user.id, detail: { voyageId: row.id, workspaceId } })
    return row
  })
  return voyageOut(db, { id: row.id, workspace_id: workspaceId, name: input.name, request: input, plan, created_at: row.created_at, eclipse_id: ws.eclipse_id })
}

async function voyageOut(db: Kysely<Database>, v: { id: number; workspace_id: number; name: string; request: VoyageCreate; plan: VoyagePlan; created_at: string; eclipse_id: string }) {
  const { el, deltaTOverride } = await elementsInForce(db, v.eclipse_id)
  return {
    id: v.id, workspaceId: v.workspace_id, eclipseId: v.eclipse_id, name: v.name, createdAt: v.created_at,
    departure: v.request.departure, speedKn: v.request.speedKn, returnTo: v.request.returnTo ?? null, holdCourse: v.request.holdCourse ?? null,
    ...v.plan,
    timetable: voyageTimetable(v.eclipse_id, el, deltaTOverride, v.plan),
  }
}

async function voyageRow(db: Kysely<Database>, user: User, id: number) {
  const v = await db.selectFrom('voyages').innerJoin('workspaces', 'workspaces.id', 'voyages.workspace_id')
    .select(['voyages.id', 'voyages.workspace_id', 'voyages.name', 'voyages.request', 'voyages.plan', 'voyages.created_at', 'workspaces.eclipse_id'])
    .where('voyages.id', '=', id).executeTakeFirst()
  if (!v) throw new NotFoundError('No such voyage')
  await assertWorkspaceAccess(db, user, v.workspace_id).catch(() => { throw new NotFoundError('No such voyage') })
  return v
}

export async function getVoyage(db: Kysely<Database>, user: User, id: number) {
  const v = await voyageRow(db, user, id)
  return voyageOut(db, { ...v, request: JSON.parse(v.request) as VoyageCreate, plan: JSON.parse(v.plan) as VoyagePlan })
}

export async function listVoyages(db: Kysely<Database>, user: User, workspaceId: number) {
  await assertWorkspaceAccess(db, user, workspaceId)
  const rows = await db.selectFrom('voyages').select(['id', 'name', 'plan', 'created_at']).where('workspace_id', '=', workspaceId).orderBy('id').execute()
  return rows.map((r) => {
    const p = JSON.parse(r.plan) as VoyagePlan
    // What the planning map draws: the route (and the way home), the alternatives and the hourly positions.
    return {
      id: r.id, name: r.name, createdAt: r.created_at, intercept: p.intercept, distanceNm: p.distanceNm, departBy: p.departBy,
      route: p.route, homeward: p.homeward?.route ?? null, hourly: p.hourly,
      alternatives: p.alternatives.map((a) => ({ lat: a.lat, lon: a.lon, durationSec: a.durationSec, expectedSec: a.expectedSec })),
    }
  })
}

export async function deleteVoyage(db: Kysely<Database>, user: User, id: number) {
  await voyageRow(db, user, id)
  await db.transaction().execute(async (trx) => {
    await trx.deleteFrom('voyages').where('id', '=', id).execute()
    await audit(trx, { action: 'voyage_delete', actorUserId: user.id, detail: { voyageId: id } })
  })
}
