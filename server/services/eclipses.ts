import type { Kysely } from 'kysely'
import type { BesselianElements, Site } from '../../shared/eclipse/types'
import { PublishedElements, type PublishedElementsInput } from '../../shared/schemas/elements'
import type { Database, User } from '../database/schema'
import { catalogue, rowFromElements, type CatalogueRow } from '../eclipse/catalogue'
import { localReport, pathReport, resolveTimeBasis, timeBasisOut } from '../eclipse/report'
import { audit } from './audit'
import { businessDate, nowIso } from './clock'

export class UnknownEclipseError extends Error {}

/**
 * The stored catalogue's computed set for an eclipse id, or UnknownEclipseError. Only the 1900–2100
 * catalogue is served: an id outside it is refused here, before any element computation (computing a
 * set from the full lunar series costs about half a second of CPU, far too much for a public route).
 */
function catalogued(id: string): BesselianElements {
  const el = catalogue().elements.get(id)
  if (!el) throw new UnknownEclipseError(`No solar eclipse on ${id} in the catalogue (1900–2100)`)
  return el
}

/** The element set in force for an eclipse: the newest published set if any, else the computed one; plus the ΔT override. */
export async function elementsInForce(db: Kysely<Database>, id: string): Promise<{ el: BesselianElements; key: string; deltaTOverride: number | null }> {
  const computed = catalogued(id)
  const published = await db.selectFrom('element_sets').select(['id', 'elements']).where('eclipse_id', '=', id)
    .orderBy('id', 'desc').executeTakeFirst()
  const settings = await db.selectFrom('eclipse_settings').select('delta_t_sec').where('eclipse_id', '=', id).executeTakeFirst()
  const deltaTOverride = settings?.delta_t_sec ?? null
  if (published) {
    const el = { ...PublishedElements.parse(JSON.parse(published.elements)), kind: 'published' as const }
    return { el, key: `published:${published.id}`, deltaTOverride }
  }
  return { el: computed, key: 'computed', deltaTOverride }
}

export function listEclipses(q: { from?: number; to?: number; type?: string; upcoming?: string }): CatalogueRow[] {
  // Compared by business date, so a pinned date (tests, the demo) shows the eclipses after it.
  const today = businessDate()
  return catalogue().rows.filter((r) => {
    const y = Number(r.id.slice(0, 4))
    if (q.from !== undefined && y < q.from) return false
    if (q.to !== undefined && y > q.to) return false
    if (q.type && r.type !== q.type) return false
    if (q.upcoming && r.greatest.utc.slice(0, 10) < today) return false
    return true
  })
}

/**
 * Results computed on demand for the public routes are kept in two in-memory caches, oldest out:
 * - `bounded`: eclipse details and paths at the ΔT in force. Their keys come from a small, known set
 *   (catalogue id × element set × step × wrap), so every one of them can be cached, up to about 64 MB.
 * - `whatIf`: local circumstances for any site and paths at a ΔT the caller chose. Their key space has
 *   no useful bound, so they live in a small cache of their own (at most WHAT_IF_MAX entries) and cannot
 *   push the bounded results out; what they cost is capped by the per-address rate limits on the routes.
 */
class SizedCache {
  private readonly map = new Map<string, { v: unknown; bytes: number }>()
  private bytes = 0
  constructor(private readonly maxBytes: number, private readonly maxEntries: number) {}
  get<T>(key: string, make: () => T): T {
    const hit = this.map.get(key)
    if (hit) return hit.v as T
    const v = make()
    const bytes = JSON.stringify(v).length
    while (this.map.size && (this.bytes + bytes > this.maxBytes || this.map.size >= this.maxEntries)) {
      const oldest = this.map.keys().next().value!
      this.bytes -= this.map.get(oldest)!.bytes
      this.map.delete(oldest)
    }
    this.map.set(key, { v, bytes })
    this.bytes += bytes
    return v
  }
  clear() {
    this.map.clear()
    this.bytes = 0
  }
}
const bounded = new SizedCache(64 * 1024 * 1024, Infinity)
/** Local circumstances are a few kB each; paths at a chosen ΔT up to a few hundred kB. */
const WHAT_IF_MAX = 500
const whatIf = new SizedCache(32 * 1024 * 1024, WHAT_IF_MAX)
function clearCache() {
  bounded.clear()
  whatIf.clear()
}

export async function eclipseDetail(db: Kysely<Database>, id: string) {
  const { el, key, deltaTOverride } = await elementsInForce(db, id)
  return bounded.get(`detail|${id}|${key}|${deltaTOverride}`, () => {
    const dt = resolveTimeBasis(el, deltaTOverride)
    return {
      ...rowFromElements(el, dt.deltaTSec, dt.ttMinusClockSec),
      deltaT: { sec: dt.deltaTSec, sigmaSec: Math.round(dt.deltaTSigmaSec * 10) / 10, basis: dt.deltaTBasis, override: deltaTOverride },
      time: timeBasisOut(dt, el),
      elements: el,
    }
  })
}

export async function eclipsePathFor(db: Kysely<Database>, id: string, q: { step?: number; deltaT?: number; wrap?: 'split' | 'unwrap' }) {
  const { el, key, deltaTOverride } = await elementsInForce(db, id)
  const deltaT = q.deltaT ?? deltaTOverride
  const cache = q.deltaT === undefined ? bounded : whatIf
  return cache.get(`path|${id}|${key}|${deltaT}|${q.step ?? 60}|${q.wrap ?? 'split'}`,
    () => pathReport(id, el, { stepSec: q.step ?? 60, deltaT, wrap: q.wrap }))
}

export async function eclipseLocalFor(db: Kysely<Database>, id: string, site: Site, deltaTReq?: number) {
  const { el, key, deltaTOverride } = await elementsInForce(db, id)
  const deltaT = deltaTReq ?? deltaTOverride
  return whatIf.get(`local|${id}|${key}|${deltaT}|${site.latDeg}|${site.lonDeg}|${site.elevationM ?? 0}`,
    () => localReport(id, el, site, deltaT))
}

export async function importPublishedElements(db: Kysely<Database>, actor: User, id: string, input: PublishedElementsInput) {
  catalogued(id)
  const el: BesselianElements = { ...input, kind: 'published' }
  // The set must describe this eclipse: its greatest eclipse must fall on the same UTC date.
  const row = rowFromElements(el)
  if (row.id !== id) throw new Error(`These elements put greatest eclipse on ${row.id}, not ${id}`)
  return db.transaction().execute(async (trx) => {
    const r = await trx.insertInto('element_sets').values({
      eclipse_id: id, elements: JSON.stringify(input), source: input.source, created_by: actor.id,
    }).returning('id').executeTakeFirstOrThrow()
    await audit(trx, { action: 'elements_import', actorUserId: actor.id, detail: { eclipseId: id, source: input.source } })
    clearCache()
    return { id: r.id, greatest: row }
  })
}

export async function removePublishedElements(db: Kysely<Database>, actor: User, id: string) {
  await db.transaction().execute(async (trx) => {
    await trx.deleteFrom('element_sets').where('eclipse_id', '=', id).execute()
    await audit(trx, { action: 'elements_remove', actorUserId: actor.id, detail: { eclipseId: id } })
  })
  clearCache()
}

export async function setDeltaTOverride(db: Kysely<Database>, actor: User, id: string, deltaTSec: number | null) {
  catalogued(id)
  await db.transaction().execute(async (trx) => {
    await trx.insertInto('eclipse_settings').values({ eclipse_id: id, delta_t_sec: deltaTSec, updated_by: actor.id, updated_at: nowIso() })
      .onConflict((oc) => oc.column('eclipse_id').doUpdateSet({ delta_t_sec: deltaTSec, updated_by: actor.id, updated_at: nowIso() }))
      .execute()
    await audit(trx, { action: 'delta_t_override', actorUserId: actor.id, detail: { eclipseId: id, deltaTSec } })
  })
  clearCache()
}
