import { localCircumstances, pathOffset, type LocalContact } from '../../shared/eclipse/local'
import { eclipsePath, type FeatureCollection } from '../../shared/eclipse/path'
import { tToUtcMs, jdT0 } from '../../shared/eclipse/time'
import { contactUncertainty } from '../../shared/eclipse/uncertainty'
import { timeBasisAt, timeBasisLine, type TimeBasis } from '../../shared/eclipse/timeScales'
import type { BesselianElements, Site } from '../../shared/eclipse/types'

/**
 * The time basis for an eclipse: the clock offset TT − UTC from the leap-second table, and ΔT from
 * the model for the set's t0 (observed or predicted), unless an explicit ΔT overrides it. A published
 * set's own ΔT is the publisher's forecast; it is reported beside ours but not used unless an
 * organiser sets it as the override.
 */
export function resolveTimeBasis(el: BesselianElements, override?: number | null): TimeBasis {
  const when = tToUtcMs(el, 0, el.deltaTSec)
  if (override !== undefined && override !== null) {
    return timeBasisAt(when, { deltaTSec: override, basis: 'override', source: 'override set by the organiser or the request' })
  }
  return timeBasisAt(when)
}

/** The time basis as every output states it. */
export function timeBasisOut(b: TimeBasis, el: BesselianElements) {
  return {
    clock: b.clock,
    ttMinusUtcSec: b.clock === 'UTC' ? b.ttMinusClockSec : null,
    ut1MinusUtcSec: b.clock === 'UTC' ? b.ut1MinusUtcSec : null,
    deltaTSec: Math.round(b.deltaTSec * 100) / 100,
    deltaTSigmaSec: Math.round(b.deltaTSigmaSec * 100) / 100,
    deltaTBasis: b.deltaTBasis,
    clockSource: b.clockSource,
    deltaTSource: b.deltaTSource,
    publisherDeltaTSec: el.kind === 'published' ? el.deltaTSec : null,
    line: timeBasisLine(b),
  }
}
export type TimeBasisOut = ReturnType<typeof timeBasisOut>

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
  time: TimeBasisOut
  elementsSource: string
  elementsKind: string
}

/** Local circumstances as the CLI and the API return them. */
export function localReport(eclipseId: string, el: BesselianElements, site: Site, deltaT?: number | null): LocalReport {
  const dt = resolveTimeBasis(el, deltaT)
  const lc = localCircumstances(el, site, dt.deltaTSec, dt.ttMinusClockSec)
  const unc = contactUncertainty(el, site, lc, dt)
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
    uncertainty: { method: unc.method, deltaTSigmaSec: r2(dt.deltaTSigmaSec), terms: unc.contacts },
    deltaTSec: r2(dt.deltaTSec),
    deltaTBasis: dt.deltaTBasis,
    time: timeBasisOut(dt, el),
    elementsSource: el.source,
    elementsKind: el.kind,
  }
}

export function pathReport(eclipseId: string, el: BesselianElements, opts: { stepSec?: number; deltaT?: number | null; wrap?: 'split' | 'unwrap' }): FeatureCollection {
  const dt = resolveTimeBasis(el, opts.deltaT)
  const fc = eclipsePath(el, { stepSec: opts.stepSec ?? 60, deltaTSec: dt.deltaTSec, ttMinusClockSec: dt.ttMinusClockSec, antimeridian: opts.wrap ?? 'split' })
  fc.properties = { ...fc.properties, eclipseId, deltaTBasis: dt.deltaTBasis, time: timeBasisOut(dt, el), elementsKind: el.kind, t0JdTdt: jdT0(el) }
  return fc
}
