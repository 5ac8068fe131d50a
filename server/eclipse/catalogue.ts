import * as Astronomy from 'astronomy-engine'
import { deltaTAt } from '../../shared/eclipse/deltaT'
import { greatestEclipse } from '../../shared/eclipse/greatest'
import { jdOfDate, tToUtcMs } from '../../shared/eclipse/time'
import { timeBasisAt } from '../../shared/eclipse/timeScales'
import { JD_UNIX_EPOCH } from '../../shared/eclipse/constants'
import type { BesselianElements, CatalogueRow } from '../../shared/eclipse/types'
import { COMPUTED_SOURCE, computeElements } from './compute'
import stored from './data/catalogue.json'

export type { CatalogueRow }

const r = (v: number, d: number) => Math.round(v * 10 ** d) / 10 ** d

/** One catalogue row; `ttMinusClockSec` as in greatestEclipse (TT − UTC for UTC, default ΔT: UT1). */
export function rowFromElements(el: BesselianElements, deltaTSec = el.deltaTSec, ttMinusClockSec = deltaTSec): CatalogueRow {
  const g = greatestEclipse(el, deltaTSec, ttMinusClockSec)
  return {
    id: g.utc.slice(0, 10),
    type: g.type,
    greatest: { utc: g.utc, lat: r(g.latDeg, 3), lon: r(g.lonDeg, 3) },
    gamma: r(g.gamma, 4),
    magnitude: r(g.magnitude, 4),
    centralDurationSec: g.centralDurationSec === null ? null : r(g.centralDurationSec, 1),
    pathWidthKm: g.pathWidthKm === null ? null : r(g.pathWidthKm, 1),
    sunAltitudeDeg: r(g.sunAltitudeDeg, 1),
    deltaTSec: r(deltaTSec, 1),
  }
}

/** An element set as stored in data/catalogue.json: the fitted polynomials only (ΔT and provenance are added on load). */
export type StoredSet = Pick<BesselianElements, 'date' | 't0Tdt' | 'x' | 'y' | 'd' | 'mu' | 'l1' | 'l2' | 'tanF1' | 'tanF2'>

const sig = (v: number) => Number(v.toPrecision(11))
export function toStoredSet(el: BesselianElements): StoredSet {
  return {
    date: el.date, t0Tdt: el.t0Tdt,
    x: el.x.map(sig), y: el.y.map(sig), d: el.d.map(sig), mu: el.mu.map(sig), l1: el.l1.map(sig), l2: el.l2.map(sig),
    tanF1: sig(el.tanF1), tanF2: sig(el.tanF2),
  }
}

/** A stored set made whole: the default ΔT for its t0 from the ΔT model, the computed provenance. */
export function fromStoredSet(s: StoredSet): BesselianElements {
  const t0UtcMs = (jdOfDate(s.date) + s.t0Tdt / 24 - JD_UNIX_EPOCH) * 86_400_000 - 69_000
  return { ...s, deltaTSec: r(deltaTAt(t0UtcMs).deltaTSec, 2), source: COMPUTED_SOURCE, kind: 'computed' }
}

interface Catalogue { rows: CatalogueRow[]; elements: Map<string, BesselianElements> }
let cached: Catalogue | undefined

/**
 * Every solar eclipse from 1900 to 2100, from the generated element sets in data/catalogue.json
 * (scripts/make-catalogue.ts): evaluating 454 stored sets takes well under a second, computing
 * them from the full lunar series takes minutes.
 */
export function catalogue(): Catalogue {
  if (cached) return cached
  const rows: CatalogueRow[] = []
  const elements = new Map<string, BesselianElements>()
  for (const s of (stored as { sets: StoredSet[] }).sets) {
    const el = fromStoredSet(s)
    const basis = timeBasisAt(tToUtcMs(el, 0, el.deltaTSec))
    const row = rowFromElements(el, basis.deltaTSec, basis.ttMinusClockSec)
    rows.push(row)
    elements.set(row.id, el)
  }
  cached = { rows, elements }
  return cached
}

/** Computed elements for an eclipse id (a date), inside or outside the 1900–2100 catalogue; null when there is none. */
export function computedElementsFor(id: string): BesselianElements | null {
  const year = Number(id.slice(0, 4))
  if (year >= 1900 && year <= 2100) return catalogue().elements.get(id) ?? null
  const day = Date.parse(id + 'T00:00:00Z')
  if (Number.isNaN(day) || year < 1600 || year > 2400) return null
  const e = Astronomy.SearchGlobalSolarEclipse(Astronomy.MakeTime(new Date(day - 2 * 86_400_000)))
  const el = computeElements(e.peak.tt)
  return rowFromElements(el).id === id ? el : null
}
