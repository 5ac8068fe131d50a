import { jdOfDate } from '../../shared/eclipse/time'
import type { BesselianElements } from '../../shared/eclipse/types'

/**
 * Parses rows in the Five Millennium Canon's Besselian-element CSV layout
 * (year, mon, day, jd, t0, deltaT, x1..x4, y1..y4, d1..d3, m1..m3, l11..l13, l21..l23, tanf1, tanf2).
 * Used by tests and by the published-set importer; the application ships no Canon data.
 */
export function parseCanonCsv(text: string, source = 'Five Millennium Canon (Espenak & Meeus, NASA/TP-2006-214141)'): BesselianElements[] {
  const out: BesselianElements[] = []
  for (const raw of text.split(/\r?\n/)) {
    const line = raw.trim()
    if (!line || line.startsWith('#')) continue
    const v = line.split(',').map((s) => s.trim()).filter((s) => s !== '').map(Number)
    if (v.length < 28 || v.some((n) => Number.isNaN(n))) continue
    const [year, mon, day, jd, t0raw, dT] = v as [number, number, number, number, number, number]
    const pad = (n: number) => String(n).padStart(2, '0')
    const date = `${String(year).padStart(4, '0')}-${pad(mon)}-${pad(day)}`
    // The Canon writes t0 = 0 for an eclipse greatest just before midnight: it means 24 h on `date`.
    const t0 = jd - (jdOfDate(date) + t0raw / 24) > 0.5 ? t0raw + 24 : t0raw
    out.push({
      date,
      t0Tdt: t0,
      deltaTSec: dT,
      x: v.slice(6, 10), y: v.slice(10, 14), d: v.slice(14, 17), mu: v.slice(17, 20),
      l1: v.slice(20, 23), l2: v.slice(23, 26), tanF1: v[26]!, tanF2: v[27]!,
      source, kind: 'published',
    })
  }
  return out
}
