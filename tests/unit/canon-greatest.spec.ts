import { describe, expect, it } from 'vitest'
import { greatestEclipse } from '../../shared/eclipse'
import { canonGreatest, canonSet } from './reference'

const TYPE: Record<string, string> = { T: 'total', A: 'annular', H: 'hybrid' }

// Source: Five Millennium Canon of Solar Eclipses (Espenak & Meeus, NASA/TP-2006-214141), greatest-eclipse table,
// evaluated from the Canon's own Besselian elements with the Canon's ΔT.
describe.each(canonGreatest())('Canon greatest eclipse $date', (row) => {
  const g = greatestEclipse(canonSet(row.date), row.deltaTSec)

  it('has the Canon type', () => { expect(g.type).toBe(TYPE[row.type]) })
  it('time within 1 s (UT)', () => {
    const ref = Date.parse(`${row.date}T${row.greatestUt}Z`)
    expect(Math.abs(g.utcMs - ref)).toBeLessThanOrEqual(1000)
  })
  it('position within 0.05°', () => {
    expect(Math.abs(g.latDeg - row.latDeg)).toBeLessThanOrEqual(0.05)
    expect(Math.abs(g.lonDeg - row.lonDeg)).toBeLessThanOrEqual(0.05)
  })
  it('central duration within 1 s', () => {
    expect(Math.abs(g.centralDurationSec! - row.centralDurationSec)).toBeLessThanOrEqual(1)
  })
  it('path width within 1 km', () => {
    expect(Math.abs(g.pathWidthKm! - row.pathWidthKm)).toBeLessThanOrEqual(1)
  })
  it('γ, magnitude and Sun altitude agree', () => {
    expect(Math.abs(g.gamma - row.gamma)).toBeLessThanOrEqual(0.00015)
    expect(Math.abs(g.magnitude - row.magnitude)).toBeLessThanOrEqual(0.00015)
    expect(Math.abs(g.sunAltitudeDeg - row.sunAltDeg)).toBeLessThanOrEqual(0.1)
  })
})
