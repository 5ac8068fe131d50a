import type { Kysely } from 'kysely'
import { parseCsvGrid, storeDataset } from '../../services/climatology'
import type { Database, Role } from '../schema'
import { DEMO_CLOUD_NAME, DEMO_CLOUD_SOURCE, demoCloudCsv } from './demoCloud'

/**
 * The invented demo scenario (demo data only): Kestrel Sky Journeys, a small company planning
 * trips to the 2027-08-02 total eclipse. Idempotent: every insert is keyed on a natural key.
 */
export const DEMO_PASSWORD = 'eclipse-demo'
export const DEMO_ACCOUNTS: Array<{ email: string; name: string; role: Role }> = [
  { email: 'organiser@umbrafield.test', name: 'Ines Marlow (demo organiser)', role: 'organiser' },
  { email: 'guide@umbrafield.test', name: 'Tomas Reyland (demo guide)', role: 'guide' },
  { email: 'traveller@umbrafield.test', name: 'Aiko Brennan (demo traveller)', role: 'traveller' },
  { email: 'traveller2@umbrafield.test', name: 'Samir Okafor (demo traveller)', role: 'traveller' },
]

/** Demo candidate sites: real places along the 2027-08-02 path; notes, access and capacity are invented. */
export const DEMO_WORKSPACE = { eclipseId: '2027-08-02', name: 'Demo — Strait of Gibraltar to the Red Sea' }
export const DEMO_SITES: Array<{ name: string; lat: number; lon: number; elevationM: number; notes: string; road: 'paved' | 'gravel' | 'track'; capacity: number; border: boolean; pinned?: boolean }> = [
  { name: 'Tarifa beach', lat: 36.0143, lon: -5.6044, elevationM: 10, notes: 'Demo: levanter wind risk; low Sun over the strait.', road: 'paved', capacity: 120, border: false },
  { name: 'Tangier Cap Spartel', lat: 35.7595, lon: -5.834, elevationM: 60, notes: 'Demo: ferry from Tarifa; west horizon clear.', road: 'paved', capacity: 80, border: true },
  { name: 'Benghazi coast', lat: 32.1167, lon: 20.0667, elevationM: 5, notes: 'Demo: permits needed; check travel advice.', road: 'paved', capacity: 60, border: true },
  { name: 'Luxor West Bank', lat: 25.6872, lon: 32.6396, elevationM: 80, notes: 'Demo: near the longest totality; hotels book early.', road: 'paved', capacity: 200, border: false, pinned: true },
  { name: 'Qena plateau', lat: 26.1551, lon: 32.716, elevationM: 120, notes: 'Demo: desert road, no shade.', road: 'gravel', capacity: 90, border: false },
  { name: 'Sohag farmland', lat: 26.5591, lon: 31.6957, elevationM: 70, notes: 'Demo: irrigated fields, morning haze possible.', road: 'paved', capacity: 70, border: false },
  { name: 'Marsa Alam shore', lat: 25.0676, lon: 34.879, elevationM: 15, notes: 'Demo: Red Sea resort; inside the northern half of the path.', road: 'paved', capacity: 150, border: false },
  { name: 'Jeddah corniche', lat: 21.4858, lon: 39.1925, elevationM: 10, notes: 'Demo: humid; visa required.', road: 'paved', capacity: 100, border: true },
  { name: 'Aswan (outside the path)', lat: 24.0889, lon: 32.8998, elevationM: 110, notes: 'Demo: shows a partial-only site, 140 km south of the centreline.', road: 'paved', capacity: 100, border: false },
]

export async function seedDemo(db: Kysely<Database>): Promise<void> {
  const hash = await hashPassword(DEMO_PASSWORD)
  await db.transaction().execute(async (trx) => {
    for (const a of DEMO_ACCOUNTS) {
      await trx.insertInto('users').values({ email: a.email, name: a.name, role: a.role, password_hash: hash })
        .onConflict((oc) => oc.column('email').doNothing()).execute()
    }
    const organiser = await trx.selectFrom('users').select('id').where('email', '=', 'organiser@umbrafield.test').executeTakeFirstOrThrow()
    await trx.insertInto('workspaces').values({ eclipse_id: DEMO_WORKSPACE.eclipseId, name: DEMO_WORKSPACE.name, created_by: organiser.id })
      .onConflict((oc) => oc.columns(['eclipse_id', 'name']).doNothing()).execute()
    const ws = await trx.selectFrom('workspaces').select('id').where('eclipse_id', '=', DEMO_WORKSPACE.eclipseId).where('name', '=', DEMO_WORKSPACE.name).executeTakeFirstOrThrow()
    const existing = new Set((await trx.selectFrom('sites').select('name').where('workspace_id', '=', ws.id).execute()).map((r) => r.name))
    for (const s of DEMO_SITES) {
      if (existing.has(s.name)) continue
      await trx.insertInto('sites').values({
        workspace_id: ws.id, name: s.name, lat: s.lat, lon: s.lon, elevation_m: s.elevationM, notes: s.notes,
        road_access: s.road, capacity: s.capacity, crosses_border: s.border ? 1 : 0, pinned: s.pinned ? 1 : 0,
      }).execute()
    }
  })
  // The invented demo cloud grid, chosen for the demo workspace.
  let cloud = await db.selectFrom('climatology_datasets').select('id').where('demo', '=', 1).executeTakeFirst()
  if (!cloud) {
    const id = await storeDataset(db, null, {
      name: DEMO_CLOUD_NAME, source: DEMO_CLOUD_SOURCE, licence: 'none (invented)', years: 'none (invented)',
      timeOfDay: 'around the local time of the eclipse (invented)', demo: true,
    }, parseCsvGrid(demoCloudCsv()))
    cloud = { id }
  }
  await db.updateTable('workspaces').set({ climatology_id: cloud.id })
    .where('eclipse_id', '=', DEMO_WORKSPACE.eclipseId).where('name', '=', DEMO_WORKSPACE.name).where('climatology_id', 'is', null).execute()
}
