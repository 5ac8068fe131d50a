import { deltaTAt } from '../../shared/eclipse/deltaT'
import { localCircumstances, pathOffset, type LocalContact } from '../../shared/eclipse/local'
import { eclipsePath, type FeatureCollection } from '../../shared/eclipse/path'
import { tToUtcMs, jdT0 } from '../../shared/eclipse/time'
import { contactUncertainty } from '../../shared/eclipse/uncertainty'
import type { BesselianElements, Site } from '../../shared/eclipse/types'

/** ΔT to use and its one-sigma: an explicit value wins, else the set's own value; sigma from the model for that date. */
export function resolveDeltaT(el: BesselianElements, override?: number | null): { deltaTSec: number; sigmaSec: number; basis: string } {
  const when = tToUtcMs(el, 0, el.deltaTSec)
  const model = deltaTAt(when)
  if (override !== undefined && override !== null) return { deltaTSec: override, sigmaSec: model.sigmaSec, basis: 'override' }
  return { deltaTSec: el.deltaTSec, sigmaSec: model.sigmaSec, basis: el.kind === 'published' ? 'published with the element set' : model.basis }
}

const r1 = (v: number) => Math.round(v * 10) / 10
const r2 = (v: number) => Math.round(v * 100) / 100

/** "upper right, about 2 o'clock" from a vertex angle (degrees from the zenith, counter-clockwise on the sky). */
export function clockDirection(vertexAngleDeg: number): { clock: number; words: string } {
  const hour = Math.round((((360 - vertexAngleDeg) % 360) + 360) % 360 / 30) % 12 || 12
  const words: Record<number, string> = {
    12: 'at the top', 1: 'at upper right', 2: 'at upper right', 3: 'at the right', 4: 'at lower right', 5: 'at lower right',
    6: 'at the bottom', 7: 'at lower left', 8: 'at lower left', 9: 'at the left', 10: 'at upper left', 11: 'at upper left',
  }
  return { clock: hour, words: `${words[hour]}, about ${hour} o'clock` }
}

export interface ContactOut {
  utc: string
  altitudeDeg: number
  apparentAltitudeDeg: number
  azimuthDeg: number
  belowHorizon: boolean
  uncertaintySec: number
  positionAngleDeg?: number
  vertexAngleDeg?: number
  direction?: string
}

export interface LocalReport {
  eclipseId: string
  site: { lat: number; lon: number; elevationM: number }
  type: string
  visible: boolean
  c1?: ContactOut; c2?: ContactOut; max?: ContactOut; c3?: ContactOut; c4?: ContactOut
  durationSec: number
  magnitude: number
  obscuration: number
  centrelineDistanceKm: number | null
  halfWidthFraction: number | null
  limitDistanceKm: number | null
  uncertaintySec: Record<string, number>
  uncertainty: { method: string; deltaTSigmaSec: number; terms: Record<string, unknown> }
  deltaTSec: number
  deltaTBasis: string
  elementsSource: string
  elementsKind: string
}

/** Local circumstances as the CLI and the API return them. */
export function localReport(eclipseId: string, el: BesselianElements, site: Site, deltaT?: number | null): LocalReport {
  const dt = resolveDeltaT(el, deltaT)
  const lc = localCircumstances(el, site, dt.deltaTSec)
  const unc = contactUncertainty(el, site, lc, dt.deltaTSec, dt.sigmaSec)
  const off = lc.type === 'none' ? null : pathOffset(el, site, dt.deltaTSec)
  const out = (name: 'c1' | 'c2' | 'max' | 'c3' | 'c4', c?: LocalContact): ContactOut | undefined => {
    if (!c) return undefined
    const o: ContactOut = {
      utc: c.utc, altitudeDeg: r1(c.altitudeDeg), apparentAltitudeDeg: r1(c.apparentAltitudeDeg), azimuthDeg: r1(c.azimuthDeg),
      belowHorizon: c.belowHorizon, uncertaintySec: unc.contacts[name]?.totalSec ?? 0,
    }
    if (c.positionAngleDeg !== undefined) {
      o.positionAngleDeg = r1(c.positionAngleDeg)
      o.vertexAngleDeg = r1(c.vertexAngleDeg!)
      o.direction = clockDirection(c.vertexAngleDeg!).words
    }
    return o
  }
  return {
    eclipseId,
    site: { lat: site.latDeg, lon: site.lonDeg, elevationM: site.elevationM ?? 0 },
    type: lc.type,
    visible: lc.visible,
    c1: out('c1', lc.c1), c2: out('c2', lc.c2), max: out('max', lc.max), c3: out('c3', lc.c3), c4: out('c4', lc.c4),
    durationSec: r1(lc.durationSec),
    magnitude: Math.round(lc.magnitude * 1e4) / 1e4,
    obscuration: Math.round(lc.obscuration * 1e4) / 1e4,
    centrelineDistanceKm: off ? r2(off.centrelineDistanceKm) : null,
    halfWidthFraction: off ? Math.round(off.halfWidthFraction * 1e4) / 1e4 : null,
    limitDistanceKm: off && Number.isFinite(off.limitDistanceKm) ? r2(off.limitDistanceKm) : null,
    uncertaintySec: Object.fromEntries(Object.entries(unc.contacts).map(([k, v]) => [k, v!.totalSec])),
    uncertainty: { method: unc.method, deltaTSigmaSec: r1(dt.sigmaSec), terms: unc.contacts },
    deltaTSec: dt.deltaTSec,
    deltaTBasis: dt.basis,
    elementsSource: el.source,
    elementsKind: el.kind,
  }
}

export function pathReport(eclipseId: string, el: BesselianElements, opts: { stepSec?: number; deltaT?: number | null; wrap?: 'split' | 'unwrap' }): FeatureCollection {
  const dt = resolveDeltaT(el, opts.deltaT)
  const fc = eclipsePath(el, { stepSec: opts.stepSec ?? 60, deltaTSec: dt.deltaTSec, antimeridian: opts.wrap ?? 'split' })
  fc.properties = { ...fc.properties, eclipseId, deltaTBasis: dt.basis, elementsKind: el.kind, t0JdTdt: jdT0(el) }
  return fc
}
