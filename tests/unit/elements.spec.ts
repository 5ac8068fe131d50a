import * as Astronomy from 'astronomy-engine'
import { describe, expect, it } from 'vitest'
import { computeElements } from '../../server/eclipse/compute'
import { EARTH_EQUATORIAL_RADIUS_KM, elementsAt, greatestEclipse, jdT0 } from '../../shared/eclipse'
import { COMPUTED_ELEMENTS_KM } from '../../shared/eclipse/uncertainty'
import { canonSets } from './reference'

// Source: Besselian elements of all 454 solar eclipses 1900–2100 from the Five Millennium Canon
// (Espenak & Meeus, NASA/TP-2006-214141). Our sets come from astronomy-engine's Sun and Moon.
describe('computed elements against the Five Millennium Canon, 1900–2100', () => {
  const canon = canonSets()
  const found: ReturnType<typeof computeElements>[] = []
  let e = Astronomy.SearchGlobalSolarEclipse(Astronomy.MakeTime(new Date(Date.UTC(1900, 0, 1))))
  while (e.peak.date.getUTCFullYear() <= 2100) {
    found.push(computeElements(e.peak.tt))
    e = Astronomy.NextGlobalSolarEclipse(e.peak)
  }

  it('finds the same 454 eclipses as the Canon', () => {
    expect(found.length).toBe(454)
    expect(canon.length).toBe(454)
    const ours = new Set(found.map((f) => f.date))
    expect(canon.filter((c) => !ours.has(c.date))).toEqual([])
  })

  it('agrees in x, y, l1 and l2 to a few km (spread printed)', () => {
    const worst = { x: 0, y: 0, l1: 0, l2: 0 }
    let sx = 0, sy = 0, n = 0
    let worstDate = ''
    for (const c of canon) {
      const el = found.find((f) => f.date === c.date)!
      for (const dt of [-2, -1, 0, 1, 2]) {
        const tc = dt
        const te = (jdT0(c) - jdT0(el)) * 24 + dt
        const a = elementsAt(c, tc)
        const b = elementsAt(el, te)
        const dx = Math.abs(a.x - b.x) * EARTH_EQUATORIAL_RADIUS_KM
        const dy = Math.abs(a.y - b.y) * EARTH_EQUATORIAL_RADIUS_KM
        if (dx > worst.x) { worst.x = dx; worstDate = c.date }
        worst.y = Math.max(worst.y, dy)
        worst.l1 = Math.max(worst.l1, Math.abs(a.l1 - b.l1) * EARTH_EQUATORIAL_RADIUS_KM)
        worst.l2 = Math.max(worst.l2, Math.abs(a.l2 - b.l2) * EARTH_EQUATORIAL_RADIUS_KM)
        sx += dx * dx; sy += dy * dy; n++
      }
    }
    const rms = { x: Math.sqrt(sx / n), y: Math.sqrt(sy / n) }
    console.log(`[elements vs Canon] worst km: x ${worst.x.toFixed(2)} (${worstDate}), y ${worst.y.toFixed(2)}, l1 ${worst.l1.toFixed(3)}, l2 ${worst.l2.toFixed(3)}; RMS km: x ${rms.x.toFixed(2)}, y ${rms.y.toFixed(2)}`)
    // Bounds the data support: the residual is astronomy-engine's lunar theory (about 1–2″ at the Moon).
    expect(worst.x).toBeLessThan(9)
    expect(worst.y).toBeLessThan(7)
    expect(worst.l1).toBeLessThan(0.1)
    expect(worst.l2).toBeLessThan(0.1)
    // The uncertainty model's element term must not claim better than the measured RMS.
    expect(COMPUTED_ELEMENTS_KM).toBeGreaterThanOrEqual(Math.hypot(rms.x, rms.y) * 0.95)
  })

  it('greatest eclipse of 2024-04-08 from computed elements is within 6 s of the Canon (same ΔT)', () => {
    // The known case: the lunar-theory residual on this date is about 4.4 km along x.
    const c = canon.find((s) => s.date === '2024-04-08')!
    const el = found.find((f) => f.date === '2024-04-08')!
    const a = greatestEclipse(c, 74)
    const b = greatestEclipse(el, 74)
    console.log(`[2024-04-08 greatest] Canon ${a.utc}, computed ${b.utc}`)
    expect(Math.abs(a.utcMs - b.utcMs)).toBeLessThan(6000)
  })
})
