import { EARTH_EQUATORIAL_RADIUS_KM } from './constants'
import { localCircumstances, type ContactName, type LocalCircumstances } from './local'
import type { BesselianElements, Site } from './types'

/**
 * One-sigma uncertainty terms for contact times, seconds. Combined in quadrature.
 *
 * - elements: how well the element set fixes the shadow's position, as a distance on the
 *   fundamental plane, turned into time by the shadow's speed relative to the site at that
 *   contact (slow shadows make larger time errors). Computed sets: 2.7 km, the RMS of
 *   (Δx, Δy) of astronomy-engine-based sets against the Five Millennium Canon over all 454
 *   eclipses of 1900–2100 (printed by tests/unit/elements.spec.ts; worst case about 8 km).
 *   Published sets: 0.3 km, for the publisher's ephemeris and coefficient rounding.
 * - ΔT: the contact-time change when ΔT moves by its own one-sigma, found by recomputing.
 * - limb: the Moon's limb profile moves C2/C3 by about ±1–3 s (common practice, NASA bulletins);
 *   2 s is used. Smooth-limb predictions cannot do better.
 * - clock: UT1 is used for UTC; they differ by less than 0.9 s (0.5 s as one sigma).
 */
export const PUBLISHED_ELEMENTS_KM = 0.3
export const COMPUTED_ELEMENTS_KM = 2.7
export const LIMB_PROFILE_SEC = 2
export const UT1_UTC_SEC = 0.5

export interface ContactUncertainty {
  totalSec: number
  elementsSec: number
  deltaTSec: number
  limbSec: number
  clockSec: number
}

export interface UncertaintyReport {
  contacts: Partial<Record<ContactName, ContactUncertainty>>
  deltaTSigmaSec: number
  method: string
}

const CONTACTS: ContactName[] = ['c1', 'c2', 'max', 'c3', 'c4']

export function contactUncertainty(el: BesselianElements, site: Site, lc: LocalCircumstances,
  deltaTSec: number, deltaTSigmaSec: number): UncertaintyReport {
  const shifted = localCircumstances(el, site, deltaTSec + deltaTSigmaSec)
  const elementsKm = el.kind === 'published' ? PUBLISHED_ELEMENTS_KM : COMPUTED_ELEMENTS_KM
  const contacts: UncertaintyReport['contacts'] = {}
  for (const name of CONTACTS) {
    const c = lc[name]
    if (!c) continue
    const elementsSec = Math.round(((elementsKm / EARTH_EQUATORIAL_RADIUS_KM) / c.relativeSpeedErPerHour) * 3600 * 100) / 100
    const other = shifted[name]
    // A contact that vanishes when ΔT moves (a site at the limit) is as uncertain as the phase it bounds.
    const dT = other ? Math.abs(other.utcMs - c.utcMs) / 1000 : Math.max(lc.durationSec / 2, 1)
    const limbSec = name === 'c2' || name === 'c3' ? LIMB_PROFILE_SEC : 0
    const totalSec = Math.sqrt(elementsSec ** 2 + dT ** 2 + limbSec ** 2 + UT1_UTC_SEC ** 2)
    contacts[name] = {
      totalSec: Math.round(totalSec * 10) / 10,
      elementsSec, deltaTSec: Math.round(dT * 100) / 100, limbSec, clockSec: UT1_UTC_SEC,
    }
  }
  return {
    contacts,
    deltaTSigmaSec,
    method: 'one sigma, in quadrature: element set ±' + elementsKm + ' km on the fundamental plane over the shadow\'s local speed, ΔT ±' + deltaTSigmaSec.toFixed(1) +
      ' s propagated by recomputing, lunar limb profile ±' + LIMB_PROFILE_SEC + ' s at C2/C3, UT1−UTC ' + UT1_UTC_SEC + ' s',
  }
}
