import { fc } from '@fast-check/vitest'
import { computedElementsFor } from '../../server/eclipse/catalogue'
import { localReport } from '../../server/eclipse/report'
import { deltaTHourAngleRad, greatestT, offsetPoint } from '../../shared/eclipse'

/**
 * The stretches of a hybrid eclipse's path, in hours from greatest eclipse, where the centreline sees
 * an annular eclipse: found here by walking the centreline outwards in 9 s steps from the middle of the
 * path to its ends (a hybrid is annular only near sunrise and sunset, for a few minutes of the shadow's
 * track). Empty for an eclipse whose centreline is never annular.
 */
export function annularStretches(id: string): Array<[number, number]> {
  const el = computedElementsFor(id)!
  const tg = greatestT(el)
  const dH = deltaTHourAngleRad(el.deltaTSec)
  const typeAt = (along: number) => {
    const p = offsetPoint(el, tg + along, 0, 'umbra', dH)
    return p ? localReport(id, el, { latDeg: p.latDeg, lonDeg: p.lonDeg }, null).type : null
  }
  const out: Array<[number, number]> = []
  const stepH = 9 / 3600
  for (const dir of [-1, 1]) {
    let lo: number | null = null, hi: number | null = null
    for (let k = 1; k < 4 / stepH; k++) {
      const along = dir * k * stepH
      const t = typeAt(along)
      if (t === null) break
      if (t === 'annular') { lo = lo === null ? along : Math.min(lo, along); hi = hi === null ? along : Math.max(hi, along) }
    }
    if (lo !== null && hi !== null) out.push([lo, hi])
  }
  return out
}

/** Hours from greatest eclipse over which the centreline is on the Earth (9 s steps outwards from greatest). */
export function centrelineSpan(id: string): [number, number] {
  const el = computedElementsFor(id)!
  const tg = greatestT(el)
  const dH = deltaTHourAngleRad(el.deltaTSec)
  const stepH = 9 / 3600
  const end = (dir: number) => {
    let k = 0
    while (k < 4 / stepH && offsetPoint(el, tg + dir * (k + 1) * stepH, 0, 'umbra', dH)) k++
    return dir * k * stepH
  }
  return [end(-1), end(1)]
}

/**
 * Hours from greatest eclipse: mostly anywhere in ±`spanH` where the centreline is on the Earth, and, for an eclipse with annular stretches
 * (a hybrid), half the time inside one of them, so the property reaches the annular ends.
 */
export function alongArb(id: string, spanH: number) {
  const [lo, hi] = centrelineSpan(id)
  const wide = fc.double({ min: Math.max(-spanH, lo), max: Math.min(spanH, hi), noNaN: true })
  const ends = annularStretches(id).map(([lo, hi]) => fc.double({ min: lo, max: hi, noNaN: true }))
  return ends.length ? fc.oneof({ arbitrary: wide, weight: ends.length }, ...ends.map((a) => ({ arbitrary: a, weight: 1 }))) : wide
}

/**
 * Filter margins as an organiser may store them: below the least margins (which the rule must raise),
 * exactly the least, or wider (which the rule must honour). Each part drawn on its own.
 */
export function marginsArb(minSigmas: number, minEndSec: number) {
  const part = (min: number, max: number) => fc.oneof(
    fc.double({ min: 0, max: min, noNaN: true, maxExcluded: true }),
    fc.constant(min),
    fc.double({ min, max, noNaN: true, minExcluded: true }),
  )
  return fc.record({ sigmas: part(minSigmas, 6), endSec: part(minEndSec, 30) })
}
