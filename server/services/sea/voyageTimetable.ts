import type { BesselianElements } from '../../../shared/eclipse/types'
import { isoTenths } from '../../../shared/eclipse/time'
import { MIN_MARGIN_END_SEC, MIN_MARGIN_SIGMAS, planCues, type CueAnchor, type CueInput } from '../../../shared/safety/cues'
import { localKindOf, phaseWords, safetyLines } from '../../../shared/safety/text'
import { localTime } from '../../../shared/time/local'
import { localReport } from '../../eclipse/report'
import { zoneAt } from '../planning'
import { cueInputFor, planetsAt } from '../timetable'
import type { VoyagePlan } from './voyagePlan'

const ANCHORS: CueAnchor[] = ['c1', 'c2', 'max', 'c3', 'c4']

/**
 * A voyage's timetable, like a site's: contacts in ship's time (the zone of the intercept, by geo-tz;
 * offshore that is the nautical zone, Etc/GMT±n) and UTC, Sun altitude and azimuth, filter cues on
 * the safe side of each contact's uncertainty (the same rule and least margins as every site), and
 * the safety lines. Cues are for the ship lying stopped at the intercept. When the plan holds a
 * course through the eclipse, the under-way contacts get their own cues from the same rule, with the
 * stationary contacts' uncertainties.
 */
export function voyageTimetable(eclipseId: string, el: BesselianElements, deltaTOverride: number | null, plan: Pick<VoyagePlan, 'intercept' | 'underway'>) {
  const { lat, lon } = plan.intercept
  const r = localReport(eclipseId, el, { latDeg: lat, lonDeg: lon, elevationM: 0 }, deltaTOverride)
  const zone = zoneAt(lat, lon)
  const kind = localKindOf(r.type)
  // The least margins every trip must keep (a voyage has no trip settings of its own).
  const margins = { filter_margin_sigmas: MIN_MARGIN_SIGMAS, filter_margin_end_sec: MIN_MARGIN_END_SEC }
  const planets = r.max ? planetsAt(Date.parse(r.max.utc), lat, lon, 0) : []
  const input = cueInputFor(el, r, margins, {}, planets)
  const contacts = Object.fromEntries(ANCHORS.map((k) => {
    const c = r[k]
    return [k, c ? { utc: c.utc, ...localTime(Date.parse(c.utc), zone), altitudeDeg: c.apparentAltitudeDeg, azimuthDeg: c.azimuthDeg, uncertaintySec: c.uncertaintySec, belowHorizon: c.belowHorizon } : null]
  }))
  const cuesOf = (inp: CueInput) => {
    const p = planCues(inp)
    return { cues: p.cues.map((c) => ({ key: c.key, label: c.label, filters: c.filters, utc: isoTenths(c.utcMs), ...localTime(c.utcMs, zone), adjusted: c.adjusted ?? null })), notice: p.notice }
  }
  const stopped = cuesOf(input)
  let underway = null
  if (plan.underway) {
    const moving: CueInput['contacts'] = {}
    for (const k of ANCHORS) {
      const m = plan.underway.contacts[k]
      const still = input.contacts[k]
      if (m && still) moving[k] = { ...still, utcMs: Date.parse(m.utc) }
    }
    const u = cuesOf({ ...input, contacts: moving })
    underway = {
      contacts: Object.fromEntries(ANCHORS.map((k) => {
        const m = plan.underway!.contacts[k]
        return [k, m ? { ...m, ...localTime(Date.parse(m.utc), zone) } : null]
      })),
      ...u,
    }
  }
  return {
    zone, kind, words: phaseWords(kind), durationSec: r.durationSec, contacts, ...stopped, underway,
    safety: safetyLines(kind), time: r.time, elementsSource: r.elementsSource, uncertaintyMethod: r.uncertainty.method,
  }
}
