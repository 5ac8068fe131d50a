import * as Astronomy from 'astronomy-engine'
import { greatestEclipse } from '../../shared/eclipse/greatest'
import type { BesselianElements, CatalogueRow } from '../../shared/eclipse/types'
import { computeElements } from './compute'

export type { CatalogueRow }

const r = (v: number, d: number) => Math.round(v * 10 ** d) / 10 ** d

export function rowFromElements(el: BesselianElements, deltaTSec = el.deltaTSec): CatalogueRow {
  const g = greatestEclipse(el, deltaTSec)
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

interface Catalogue { rows: CatalogueRow[]; elements: Map<string, BesselianElements> }
let cached: Catalogue | undefined

/** Every solar eclipse from 1900 to 2100: dates from astronomy-engine's search, values from computed element sets. */
export function catalogue(): Catalogue {
  if (cached) return cached
  const rows: CatalogueRow[] = []
  const elements = new Map<string, BesselianElements>()
  let e = Astronomy.SearchGlobalSolarEclipse(Astronomy.MakeTime(new Date(Date.UTC(1900, 0, 1))))
  while (e.peak.date.getUTCFullYear() <= 2100) {
    const el = computeElements(e.peak.tt)
    const row = rowFromElements(el)
    rows.push(row)
    elements.set(row.id, el)
    e = Astronomy.NextGlobalSolarEclipse(e.peak)
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
