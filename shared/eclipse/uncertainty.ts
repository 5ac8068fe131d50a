import { EARTH_EQUATORIAL_RADIUS_KM } from './constants'
import { localCircumstances, type ContactName, type LocalCircumstances } from './local'
import type { TimeBasis } from './timeScales'
import type { BesselianElements, Site } from './types'

/**
 * One-sigma uncertainty terms for contact times, seconds. Combined in quadrature.
 *
 * - elements: how well the element set fixes the shadow's position, as a distance on the
 *   fundamental plane, turned into time by the shadow's speed relative to the site at that
 *   contact (slow shadows make larger time errors). Computed sets (VSOP87 + ELP/MPP02-DE405):
 *   0.2 km. Against the Five Millennium Canon's sets over all 454 eclipses of 1900–2100 they
 *   differ by 0.105 km RMS in x and 0.040 km in y, worst 0.19 km (tests/unit/elements.spec.ts);
 *   the Canon's own lunar theory (ELP-2000/82) is the older of the two, so 0.2 km is a ceiling.
 *   Published sets: 0.3 km, for an unknown publisher's ephemeris and coefficient rounding.
 * - rotation: the contact-time change when ΔT (equivalently UT1 − UTC) moves by its own one-sigma,
 *   found by recomputing with the clock offset held: from 1972 TT − UTC is exact (leap-second
 *   table), so only the Earth's orientation moves. Before 1972 the clock is UT itself and moves too.
 * - limb: the Moon's limb profile moves C2/C3 by about ±1–3 s (common practice, NASA bulletins);
 *   2 s is used. Smooth-limb predictions cannot do better.
 * There is no separate clock term: TT → UTC is exact after 1972, and before it is inside ΔT.
 */
export const PUBLISHED_ELEMENTS_KM = 0.3
export const COMPUTED_ELEMENTS_KM = 0.2
export const LIMB_PROFILE_SEC = 2

export interface ContactUncertainty {
  totalSec: number
  elementsSec: number
  rotationSec: number
  limbSec: number
}

export interface UncertaintyReport {
  contacts: Partial<Record<ContactName, ContactUncertainty>>
  deltaTSigmaSec: number
  method: string
}

const CONTACTS: ContactName[] = ['c1', 'c2', 'max', 'c3', 'c4']

export function contactUncertainty(el: BesselianElements, site: Site, lc: LocalCircumstances,
  basis: Pick<TimeBasis, 'clock' | 'deltaTSec' | 'deltaTSigmaSec' | 'ttMinusClockSec'>): UncertaintyReport {
  const sigma = basis.deltaTSigmaSec
  const shiftedClock = basis.clock === 'UT' ? basis.ttMinusClockSec + sigma : basis.ttMinusClockSec
  const shifted = localCircumstances(el, site, basis.deltaTSec + sigma, shiftedClock)
  const elementsKm = el.kind === 'published' ? PUBLISHED_ELEMENTS_KM : COMPUTED_ELEMENTS_KM
  const contacts: UncertaintyReport['contacts'] = {}
  for (const name of CONTACTS) {
    const c = lc[name]
    if (!c) continue
    const elementsSec = Math.round(((elementsKm / EARTH_EQUATORIAL_RADIUS_KM) / c.relativeSpeedErPerHour) * 3600 * 100) / 100
    const other = shifted[name]
    // A contact that vanishes when ΔT moves (a site at the limit) is as uncertain as the phase it bounds.
    const rotationSec = other ? Math.abs(other.utcMs - c.utcMs) / 1000 : Math.max(lc.durationSec / 2, 1)
    const limbSec = name === 'c2' || name === 'c3' ? LIMB_PROFILE_SEC : 0
    const totalSec = Math.sqrt(elementsSec ** 2 + rotationSec ** 2 + limbSec ** 2)
    contacts[name] = {
      totalSec: Math.round(totalSec * 10) / 10,
      elementsSec, rotationSec: Math.round(rotationSec * 100) / 100, limbSec,
    }
  }
  const what = basis.clock === 'UTC' ? 'Earth rotation (UT1 − UTC) ±' : 'ΔT ±'
  return {
    contacts,
    deltaTSigmaSec: sigma,
    method: `one sigma, in quadrature: element set ±${elementsKm} km on the fundamental plane over the shadow's local speed, ` +
      `${what}${sigma.toFixed(1)} s propagated by recomputing, lunar limb profile ±${LIMB_PROFILE_SEC} s at C2/C3` +
      (basis.clock === 'UTC' ? '; TT − UTC is exact (leap-second table)' : ''),
  }
}
