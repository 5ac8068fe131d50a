import type { Kysely } from 'kysely'
import { parseCsvGrid, storeDataset } from '../../services/climatology'
import type { Database, Role } from '../schema'
import { DEMO_CLOUD_NAME, DEMO_CLOUD_SOURCE, demoCloudCsv, demoCloudCsvFor } from './demoCloud'
import { addDays, DEMO_LEAD_DAYS, demoCloudRegionFor, demoScenarioFor, demoSitePlan, type DemoKind } from './demoScenario'
import { businessDate, nowIso } from '../../services/clock'
import { seedDemoParticipants } from './demoParticipants'

/**
 * The invented demo scenario (demo data only): Kestrel Sky Journeys, a small company planning
 * trips to the 2027-08-02 total eclipse and the 2027-02-06 annular one. Once a trip of that
 * scenario has begun on the business date, the demo invents one for the next eclipse of that kind
 * instead (demoScenario.ts), so it never shows only past trips. Idempotent: every insert is keyed
 * on a natural key.
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

/** Demo: a second, annular eclipse (2027-02-06) on the Uruguayan coast; real places, invented notes. */
export const DEMO_ANNULAR_WORKSPACE = { eclipseId: '2027-02-06', name: 'Demo — Río de la Plata annular' }
export const DEMO_ANNULAR_SITES: typeof DEMO_SITES = [
  { name: 'Punta del Este, Playa Brava', lat: -34.962, lon: -54.944, elevationM: 5, notes: 'Demo: resort beach; the Sun is high in the north-west.', road: 'paved', capacity: 120, border: false, pinned: true },
  { name: 'José Ignacio lighthouse', lat: -34.84, lon: -54.63, elevationM: 15, notes: 'Demo: nearer the centreline; small village, book early.', road: 'paved', capacity: 40, border: false },
  { name: 'Montevideo Rambla (outside the path)', lat: -34.9, lon: -56.16, elevationM: 10, notes: 'Demo: shows a partial-only site north-west of the path.', road: 'paved', capacity: 200, border: false },
]
export const DEMO_ANNULAR_TRIP_TITLE = 'Ring of sunlight over Punta del Este, February 2027 (demo)'

async function seedWorkspace(trx: Kysely<Database>, organiserId: number, w: { eclipseId: string; name: string }, sites: typeof DEMO_SITES) {
  await trx.insertInto('workspaces').values({ eclipse_id: w.eclipseId, name: w.name, created_by: organiserId })
    .onConflict((oc) => oc.columns(['eclipse_id', 'name']).doNothing()).execute()
  const ws = await trx.selectFrom('workspaces').select('id').where('eclipse_id', '=', w.eclipseId).where('name', '=', w.name).executeTakeFirstOrThrow()
  const existing = new Set((await trx.selectFrom('sites').select('name').where('workspace_id', '=', ws.id).execute()).map((r) => r.name))
  for (const s of sites) {
    if (existing.has(s.name)) continue
    await trx.insertInto('sites').values({
      workspace_id: ws.id, name: s.name, lat: s.lat, lon: s.lon, elevation_m: s.elevationM, elevation_source: s.elevationM ? 'given' : null, notes: s.notes,
      road_access: s.road, capacity: s.capacity, crosses_border: s.border ? 1 : 0, pinned: s.pinned ? 1 : 0,
    }).execute()
  }
  return ws.id
}

export async function seedDemo(db: Kysely<Database>): Promise<void> {
  const scenario = demoScenarioFor(businessDate())
  const classicTotal = scenario.total?.source === 'classic'
  const classicAnnular = scenario.annular?.source === 'classic'
  const hash = await hashPassword(DEMO_PASSWORD)
  await db.transaction().execute(async (trx) => {
    for (const a of DEMO_ACCOUNTS) {
      // Demo accounts count as confirmed: their addresses are invented and take no mail.
      await trx.insertInto('users').values({ email: a.email, name: a.name, role: a.role, password_hash: hash, email_confirmed_at: nowIso() })
        .onConflict((oc) => oc.column('email').doNothing()).execute()
    }
    const organiser = await trx.selectFrom('users').select('id').where('email', '=', 'organiser@umbrafield.test').executeTakeFirstOrThrow()
    if (classicTotal) await seedWorkspace(trx, organiser.id, DEMO_WORKSPACE, DEMO_SITES)
    if (classicAnnular) await seedWorkspace(trx, organiser.id, DEMO_ANNULAR_WORKSPACE, DEMO_ANNULAR_SITES)
  })
  if (classicTotal) {
    // The invented demo cloud grid, chosen for the demo workspace.
    let cloud = await db.selectFrom('climatology_datasets').select('id').where('demo', '=', 1).where('name', '=', DEMO_CLOUD_NAME).executeTakeFirst()
    if (!cloud) {
      const id = await storeDataset(db, null, {
        name: DEMO_CLOUD_NAME, source: DEMO_CLOUD_SOURCE, licence: 'none (invented)', years: 'none (invented)',
        timeOfDay: 'around the local time of the eclipse (invented)', demo: true,
      }, parseCsvGrid(demoCloudCsv()))
      cloud = { id }
    }
    await db.updateTable('workspaces').set({ climatology_id: cloud.id })
      .where('eclipse_id', '=', DEMO_WORKSPACE.eclipseId).where('name', '=', DEMO_WORKSPACE.name).where('climatology_id', 'is', null).execute()
    await seedDemoTrip(db)
  }
  if (classicAnnular) await seedDemoAnnularTrip(db)
  for (const kind of ['total', 'annular'] as const) {
    const pick = scenario[kind]
    if (pick?.source === 'generated') await seedGeneratedTrip(db, kind, pick.eclipseId)
  }
  await seedDemoParticipants(db)
}

const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December']
const longDate = (id: string) => `${Number(id.slice(8, 10))} ${MONTHS[Number(id.slice(5, 7)) - 1]} ${id.slice(0, 4)}`

/** Names of the invented workspace and trip for a later eclipse (also the natural keys that keep the seed idempotent). */
export function generatedDemoNames(kind: DemoKind, eclipseId: string, town: string) {
  const month = `${MONTHS[Number(eclipseId.slice(5, 7)) - 1]} ${eclipseId.slice(0, 4)}`
  return {
    workspace: `Demo — ${kind} eclipse of ${longDate(eclipseId)}`,
    trip: kind === 'total' ? `Totality near ${town}, ${month} (demo)` : `Ring of sunlight near ${town}, ${month} (demo)`,
    cloud: `Demo data — not a real climatology (invented ${MONTHS[Number(eclipseId.slice(5, 7)) - 1]} cloud for the ${eclipseId} path)`,
  }
}

/**
 * Demo: a published, invented trip to a later eclipse (demoScenario.ts picks it and its sites on the
 * centreline). Dates, deposit, balance date and cancellation tiers count back from the eclipse;
 * the demo guide leads it and traveller2 holds a confirmed booking, so the briefing shows.
 */
async function seedGeneratedTrip(db: Kysely<Database>, kind: DemoKind, eclipseId: string) {
  const plan = demoSitePlan(eclipseId)
  if (!plan) return
  const [primary, ...fallbacks] = plan
  const names = generatedDemoNames(kind, eclipseId, primary!.town.name)
  const minutes = (s: number) => `${Math.floor(s / 60)} min ${Math.round(s % 60)} s`
  const sites: typeof DEMO_SITES = plan.map((p, i) => ({
    name: `Near ${p.town.name}`, lat: Math.round(p.lat * 1e4) / 1e4, lon: Math.round(p.lon * 1e4) / 1e4, elevationM: 0,
    notes: `Demo: invented site on the centreline, ${Math.round(p.town.distanceKm)} km from ${p.town.name} (${p.town.country}); `
      + `${kind === 'total' ? 'totality' : 'annular phase'} ${minutes(p.durationSec)}, Sun ${Math.round(p.sunAltitudeDeg)}° high; height not surveyed.`,
    road: i === 0 ? 'paved' : 'gravel', capacity: 100 - 20 * i, border: false, pinned: i === 0,
  }))
  const region = demoCloudRegionFor(eclipseId)
  const month = Number(eclipseId.slice(5, 7))
  let cloud = await db.selectFrom('climatology_datasets').select('id').where('demo', '=', 1).where('name', '=', names.cloud).executeTakeFirst()
  if (!cloud && region) {
    const id = await storeDataset(db, null, {
      name: names.cloud, source: DEMO_CLOUD_SOURCE, licence: 'none (invented)', years: 'none (invented)',
      timeOfDay: 'around the local time of the eclipse (invented)', demo: true,
    }, parseCsvGrid(demoCloudCsvFor(eclipseId, month, region)))
    cloud = { id }
  }
  await db.transaction().execute(async (trx) => {
    const organiser = await trx.selectFrom('users').select('id').where('email', '=', 'organiser@umbrafield.test').executeTakeFirstOrThrow()
    const wsId = await seedWorkspace(trx, organiser.id, { eclipseId, name: names.workspace }, sites)
    if (cloud) await trx.updateTable('workspaces').set({ climatology_id: cloud.id }).where('id', '=', wsId).where('climatology_id', 'is', null).execute()
    if (await trx.selectFrom('trips').select('id').where('title', '=', names.trip).executeTakeFirst()) return
    const siteId = async (name: string) => (await trx.selectFrom('sites').select('id').where('workspace_id', '=', wsId).where('name', '=', name).executeTakeFirstOrThrow()).id
    const guide = await trx.selectFrom('users').select('id').where('email', '=', 'guide@umbrafield.test').executeTakeFirstOrThrow()
    const total = kind === 'total'
    const price = total ? 249_000 : 189_000
    const deposit = total ? 50_000 : 40_000
    const currency = total ? 'eur' : 'usd'
    // Meet in town early enough to drive out (about 60 km/h) and set up two hours before the central phase.
    const meetMs = Date.parse(primary!.utc) - (2 + primary!.town.distanceKm / 60) * 3_600_000
    const trip = await trx.insertInto('trips').values({
      workspace_id: wsId, eclipse_id: eclipseId, primary_site_id: await siteId(sites[0]!.name), title: names.trip,
      description: `Demo trip by the invented company Kestrel Sky Journeys to the ${kind} eclipse of ${longDate(eclipseId)}, `
        + `watched from the centreline near ${primary!.town.name}. ${total ? 'Filters come off only during totality.' : 'Filters stay on throughout an annular eclipse.'} `
        + 'Sites, prices and terms are invented.',
      start_date: addDays(eclipseId, -DEMO_LEAD_DAYS), end_date: addDays(eclipseId, DEMO_LEAD_DAYS),
      meeting_name: `Town centre, ${primary!.town.name} (demo)`, meeting_lat: primary!.town.lat, meeting_lon: primary!.town.lon,
      meeting_time_utc: new Date(Math.floor(meetMs / 900_000) * 900_000).toISOString(), seats: total ? 24 : 16,
      price_minor: price, deposit_minor: deposit, currency, balance_due_date: addDays(eclipseId, -90),
      cancellation_tiers: JSON.stringify([{ until: addDays(eclipseId, -180), refundPct: 100 }, { until: addDays(eclipseId, -120), refundPct: 50 }]),
      min_group_size: total ? 8 : 6, status: 'published', created_by: organiser.id,
    }).returning('id').executeTakeFirstOrThrow()
    for (const [rank, f] of fallbacks.entries()) {
      await trx.insertInto('trip_backup_sites').values({ trip_id: trip.id, site_id: await siteId(`Near ${f.town.name}`), rank }).execute()
    }
    await trx.insertInto('trip_guides').values({ trip_id: trip.id, user_id: guide.id }).execute()
    const samir = await trx.selectFrom('users').select('id').where('email', '=', 'traveller2@umbrafield.test').executeTakeFirstOrThrow()
    const b = await trx.insertInto('bookings').values({
      trip_id: trip.id, user_id: samir.id, seats: 2, status: 'confirmed', hold_expires_at: null, price_minor: 2 * price, deposit_minor: 2 * deposit,
      paid_minor: 2 * deposit, currency,
    }).returning('id').executeTakeFirstOrThrow()
    await trx.insertInto('payments').values({
      booking_id: b.id, kind: 'deposit', amount_minor: 2 * deposit, currency, status: 'succeeded', checkout_session_id: null,
      payment_intent_id: null, demo: 1, completed_at: nowIso(), idem_key: `demo-seed-${b.id}`,
    }).execute()
  })
}

/** Demo: a published annular trip (no bookings), so every output can be seen in its annular wording. */
async function seedDemoAnnularTrip(db: Kysely<Database>) {
  await db.transaction().execute(async (trx) => {
    if (await trx.selectFrom('trips').select('id').where('title', '=', DEMO_ANNULAR_TRIP_TITLE).executeTakeFirst()) return
    const ws = await trx.selectFrom('workspaces').select('id').where('name', '=', DEMO_ANNULAR_WORKSPACE.name).executeTakeFirstOrThrow()
    const site = (name: string) => trx.selectFrom('sites').select('id').where('workspace_id', '=', ws.id).where('name', '=', name).executeTakeFirstOrThrow()
    const primary = await site('Punta del Este, Playa Brava')
    const backup = await site('José Ignacio lighthouse')
    const organiser = await trx.selectFrom('users').select('id').where('email', '=', 'organiser@umbrafield.test').executeTakeFirstOrThrow()
    const guide = await trx.selectFrom('users').select('id').where('email', '=', 'guide@umbrafield.test').executeTakeFirstOrThrow()
    const trip = await trx.insertInto('trips').values({
      workspace_id: ws.id, eclipse_id: DEMO_ANNULAR_WORKSPACE.eclipseId, primary_site_id: primary.id, title: DEMO_ANNULAR_TRIP_TITLE,
      description: 'Demo trip by the invented company Kestrel Sky Journeys: four nights on the Uruguayan coast for the annular eclipse of 6 February 2027. Filters stay on throughout an annular eclipse. Prices and terms are invented.',
      start_date: '2027-02-04', end_date: '2027-02-08', meeting_name: 'Hotel lobby, Rambla Lorenzo Batlle, Punta del Este (demo)',
      meeting_lat: -34.955, meeting_lon: -54.935, meeting_time_utc: '2027-02-06T13:00:00.000Z', seats: 16,
      price_minor: 189_000, deposit_minor: 40_000, currency: 'usd', balance_due_date: '2027-01-10',
      cancellation_tiers: JSON.stringify([{ until: '2026-12-31', refundPct: 100 }]),
      min_group_size: 6, status: 'published', created_by: organiser.id,
    }).returning('id').executeTakeFirstOrThrow()
    await trx.insertInto('trip_backup_sites').values({ trip_id: trip.id, site_id: backup.id, rank: 0 }).execute()
    await trx.insertInto('trip_guides').values({ trip_id: trip.id, user_id: guide.id }).execute()
  })
}

/** Demo: one published, invented trip to the Luxor site, with the demo guide and one confirmed demo booking. */
export const DEMO_TRIP_TITLE = 'Luxor totality week, August 2027 (demo)'
async function seedDemoTrip(db: Kysely<Database>) {
  await db.transaction().execute(async (trx) => {
    if (await trx.selectFrom('trips').select('id').where('title', '=', DEMO_TRIP_TITLE).executeTakeFirst()) return
    const ws = await trx.selectFrom('workspaces').select('id').where('name', '=', DEMO_WORKSPACE.name).executeTakeFirstOrThrow()
    const site = (name: string) => trx.selectFrom('sites').select('id').where('workspace_id', '=', ws.id).where('name', '=', name).executeTakeFirstOrThrow()
    const luxor = await site('Luxor West Bank')
    const backups = [await site('Qena plateau'), await site('Sohag farmland')]
    const organiser = await trx.selectFrom('users').select('id').where('email', '=', 'organiser@umbrafield.test').executeTakeFirstOrThrow()
    const guide = await trx.selectFrom('users').select('id').where('email', '=', 'guide@umbrafield.test').executeTakeFirstOrThrow()
    const trip = await trx.insertInto('trips').values({
      workspace_id: ws.id, eclipse_id: DEMO_WORKSPACE.eclipseId, primary_site_id: luxor.id, title: DEMO_TRIP_TITLE,
      description: 'Demo trip by the invented company Kestrel Sky Journeys: six nights on the Nile at Luxor, with over six minutes of totality on 2 August 2027 on the West Bank. Prices and terms are invented.',
      start_date: '2027-07-30', end_date: '2027-08-05', meeting_name: 'Hotel forecourt, Corniche el-Nil, Luxor (demo)',
      meeting_lat: 25.6989, meeting_lon: 32.6394, meeting_time_utc: '2027-08-02T03:30:00.000Z', seats: 24,
      price_minor: 249_000, deposit_minor: 50_000, currency: 'eur', balance_due_date: '2027-05-01',
      cancellation_tiers: JSON.stringify([{ until: '2027-01-31', refundPct: 100 }, { until: '2027-04-30', refundPct: 50 }]),
      min_group_size: 8, status: 'published', created_by: organiser.id,
    }).returning('id').executeTakeFirstOrThrow()
    for (const [rank, b] of backups.entries()) await trx.insertInto('trip_backup_sites').values({ trip_id: trip.id, site_id: b.id, rank }).execute()
    await trx.insertInto('trip_guides').values({ trip_id: trip.id, user_id: guide.id }).execute()
    const samir = await trx.selectFrom('users').select('id').where('email', '=', 'traveller2@umbrafield.test').executeTakeFirstOrThrow()
    const b = await trx.insertInto('bookings').values({
      trip_id: trip.id, user_id: samir.id, seats: 2, status: 'confirmed', hold_expires_at: null, price_minor: 498_000, deposit_minor: 100_000,
      paid_minor: 100_000, currency: 'eur',
    }).returning('id').executeTakeFirstOrThrow()
    await trx.insertInto('payments').values({
      booking_id: b.id, kind: 'deposit', amount_minor: 100_000, currency: 'eur', status: 'succeeded', checkout_session_id: null,
      payment_intent_id: null, demo: 1, completed_at: '2026-11-20T10:00:00.000Z', idem_key: `demo-seed-${b.id}`,
    }).execute()
  })
}
