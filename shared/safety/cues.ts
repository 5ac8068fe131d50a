import { isLocale } from '../i18n/locales'
import { rawMessage, translate, type Params } from '../i18n/translate'
import { phaseWords, type LocalKind } from './text'

/**
 * The cue rule: when a guide tells the group to take filters off and put them back on.
 * One function, planCues, serves the timetable, its PDF, the calendar files, the e-mails, the
 * countdown and the countdown's recomputation for the device's own position.
 *
 * A cue that calls for filters off may only fall inside the window
 *   [C2 + m·σ(C2),  C3 − m·σ(C3) − e]
 * where σ is the contact's stated one-sigma uncertainty, m = 2 and e = 5 s by default (an
 * organiser may widen both per trip, never narrow them). "Filters back on" falls no later than the
 * window's end. When the window is shorter than 5 s there is no filters-off cue at all.
 * Annular and partial sites never get a filters-off cue. Cues come out sorted by time.
 */

export type CueAnchor = 'c1' | 'c2' | 'max' | 'c3' | 'c4'

export interface CueDefinition {
  key: string
  anchor: CueAnchor
  /** Default offset from the anchor, seconds. */
  offsetSec: number
  /** Local kinds the cue applies to. */
  for: LocalKind[]
  /** Filter state the cue calls for. */
  filters: 'on' | 'off'
}

/** Default cues (common practice of eclipse guides). Offsets are stored per trip; labels are built per site. */
export const CUE_DEFINITIONS: readonly CueDefinition[] = [
  { key: 'partial-begins', anchor: 'c1', offsetSec: 0, for: ['total', 'annular', 'partial'], filters: 'on' },
  { key: 'shadow', anchor: 'c2', offsetSec: -120, for: ['total'], filters: 'on' },
  { key: 'beads', anchor: 'c2', offsetSec: -12, for: ['total'], filters: 'on' },
  { key: 'filters-off', anchor: 'c2', offsetSec: 0, for: ['total'], filters: 'off' },
  { key: 'chromosphere', anchor: 'c2', offsetSec: 5, for: ['total'], filters: 'off' },
  { key: 'planets', anchor: 'max', offsetSec: 0, for: ['total'], filters: 'off' },
  { key: 'filters-on', anchor: 'c3', offsetSec: -10, for: ['total'], filters: 'on' },
  { key: 'annularity', anchor: 'c2', offsetSec: 0, for: ['annular'], filters: 'on' },
  { key: 'annularity-ends', anchor: 'c3', offsetSec: 0, for: ['annular'], filters: 'on' },
  { key: 'maximum', anchor: 'max', offsetSec: 0, for: ['annular', 'partial'], filters: 'on' },
  { key: 'partial-ends', anchor: 'c4', offsetSec: 0, for: ['total', 'annular', 'partial'], filters: 'on' },
]
export const CUE_KEYS = CUE_DEFINITIONS.map((c) => c.key)

/** The least margins: 2 σ after C2 and before C3, and 5 s more before C3. */
export const MIN_MARGIN_SIGMAS = 2
export const MIN_MARGIN_END_SEC = 5
/** A window shorter than this gets no filters-off cue. */
export const MIN_WINDOW_SEC = 5
export const TOO_SHORT_NOTICE = 'Totality here is too short to remove filters safely; keep them on.'

export interface CueContact {
  /** Clock instant, ms since the Unix epoch (UTC). */
  utcMs: number
  /** Stated one-sigma uncertainty, seconds. */
  uncertaintySec: number
  /** Where on the Sun the contact happens, in words (C2/C3). */
  direction?: string
  /** The same place as a vertex angle, degrees from the zenith, counter-clockwise on the sky (for other languages' words). */
  vertexAngleDeg?: number
}

export interface CueInput {
  kind: LocalKind
  contacts: Partial<Record<CueAnchor, CueContact>>
  /** Offsets a guide or organiser set, seconds from the anchor, by cue key. */
  offsets?: Record<string, number>
  margins?: { sigmas?: number; endSec?: number }
  /** Where the shadow comes from at this site, in words ("the west-southwest"). */
  shadowFrom?: string
  /** Bright planets above the horizon at maximum. */
  planets?: Array<{ name: string; altitudeDeg: number; azimuthDeg: number }>
  /** The bearing the shadow comes from, degrees from north through east (for other languages' words). */
  shadowFromDeg?: number
  /** The language of the labels (shared/i18n/locales.ts); English when unset. */
  locale?: string
}

export interface PlannedCue {
  key: string
  anchor: CueAnchor
  /** The offset in force after the rule, seconds from the anchor. */
  offsetSec: number
  utcMs: number
  label: string
  filters: 'on' | 'off'
  /** Why the rule moved the cue from the time asked for, if it did. */
  adjusted?: string
}

export interface CuePlan {
  kind: LocalKind
  cues: PlannedCue[]
  /** The filters-off window, or null when there is none (annular, partial, or too short). */
  window: { startMs: number; endMs: number } | null
  /** Said plainly on the timetable when a total site has no window. */
  notice: string | null
  margins: { sigmas: number; endSec: number }
}

const COMPASS16 = ['north', 'north-northeast', 'northeast', 'east-northeast', 'east', 'east-southeast', 'southeast', 'south-southeast',
  'south', 'south-southwest', 'southwest', 'west-southwest', 'west', 'west-northwest', 'northwest', 'north-northwest']
const COMPASS_SHORT = ['N', 'NNE', 'NE', 'ENE', 'E', 'ESE', 'SE', 'SSE', 'S', 'SSW', 'SW', 'WSW', 'W', 'WNW', 'NW', 'NNW']
const sector = (deg: number) => Math.round((((deg % 360) + 360) % 360) / 22.5) % 16
/** A bearing in words: 250° → "west-southwest". */
export const compassWords = (deg: number) => COMPASS16[sector(deg)]!
/** A bearing as a 16-point abbreviation: 250° → "WSW". */
export const compassShort = (deg: number) => COMPASS_SHORT[sector(deg)]!

/** Margins in force: never below the minimum, whatever was stored. */
export function effectiveMargins(m?: { sigmas?: number; endSec?: number }) {
  return {
    sigmas: Math.max(MIN_MARGIN_SIGMAS, m?.sigmas ?? MIN_MARGIN_SIGMAS),
    endSec: Math.max(MIN_MARGIN_END_SEC, m?.endSec ?? MIN_MARGIN_END_SEC),
  }
}

/** The filters-off window at a site, or null. */
export function filtersOffWindow(input: Pick<CueInput, 'kind' | 'contacts' | 'margins'>): { startMs: number; endMs: number } | null {
  const { c2, c3 } = input.contacts
  if (input.kind !== 'total' || !c2 || !c3) return null
  const m = effectiveMargins(input.margins)
  const startMs = c2.utcMs + m.sigmas * c2.uncertaintySec * 1000
  const endMs = c3.utcMs - (m.sigmas * c3.uncertaintySec + m.endSec) * 1000
  return endMs - startMs >= MIN_WINDOW_SEC * 1000 ? { startMs, endMs } : null
}

/** A bearing in words or as a 16-point abbreviation, in a locale (i18n/locales/<code>/doc.json, doc.compass). */
export function compassIn(deg: number, locale: string | null | undefined, form: 'words' | 'short'): string {
  const list = translate(locale, form === 'words' ? 'doc.compass.words' : 'doc.compass.short').split(form === 'words' ? ', ' : ' ')
  return list[sector(deg)] ?? (form === 'words' ? compassWords(deg) : compassShort(deg))
}

const CLOCK_PLACES: Record<number, string> = {
  12: 'top', 1: 'upperRight', 2: 'upperRight', 3: 'right', 4: 'lowerRight', 5: 'lowerRight',
  6: 'bottom', 7: 'lowerLeft', 8: 'lowerLeft', 9: 'left', 10: 'upperLeft', 11: 'upperLeft',
}

/**
 * Where a contact happens on the Sun's disc, as a clock position, in a locale. English keeps the
 * engine's own words (`direction`); other languages build theirs from the vertex angle.
 */
export function contactPlaceIn(direction: string | undefined, vertexAngleDeg: number | undefined, locale: string | null | undefined): string | undefined {
  if (!direction) return undefined
  if (!locale || locale === 'en' || vertexAngleDeg === undefined) return direction
  const hour = Math.round((((360 - vertexAngleDeg) % 360) + 360) % 360 / 30) % 12 || 12
  return translate(locale, 'doc.clock.at', { where: translate(locale, `doc.clock.${CLOCK_PLACES[hour]}`), hour }, hour)
}

const whereOn = (c: CueContact | undefined, locale: string | null | undefined) => contactPlaceIn(c?.direction, c?.vertexAngleDeg, locale)

function labelFor(key: string, input: CueInput, atMs: number): string {
  const { contacts, locale } = input
  const t = (k: string, params: Params = {}) => translate(locale, `doc.cues.${k}`, params)
  const english = !locale || locale === 'en'
  switch (key) {
    case 'partial-begins': return t('partialBegins')
    case 'shadow': {
      const dir = english || input.shadowFromDeg === undefined ? input.shadowFrom : compassIn(input.shadowFromDeg, locale, 'words')
      return dir ? t('shadow', { dir }) : t('shadowNoDir')
    }
    case 'beads': {
      const where = whereOn(contacts.c2, locale)
      return where ? t('beadsWhere', { where }) : t('beads')
    }
    case 'filters-off': return t('filtersOff')
    case 'chromosphere': return t('chromosphere')
    case 'planets': {
      const p = input.planets ?? []
      const name = (n: string) => (rawMessage(isLocale(locale) ? locale : 'en', `doc.planets.${n}`) ?? n)
      return p.length ? t('planets', { list: p.map((x) => t('planet', { name: name(x.name), alt: Math.round(x.altitudeDeg), dir: compassIn(x.azimuthDeg, locale, 'short') })).join(', ') }) : t('noPlanets')
    }
    case 'filters-on': {
      const left = contacts.c3 ? Math.max(0, Math.round((contacts.c3.utcMs - atMs) / 1000)) : 0
      const where = whereOn(contacts.c3, locale)
      return where ? t('filtersOnWhere', { sec: left, where }) : t('filtersOn', { sec: left })
    }
    case 'annularity': return t('annularity')
    case 'annularity-ends': return t('annularityEnds')
    case 'maximum': return t('maximum')
    case 'partial-ends': return t('partialEnds')
    default: return key
  }
}

const clamp = (v: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, v))
const fmtOffset = (anchor: CueAnchor, sec: number) => `${anchor.toUpperCase()} ${sec >= 0 ? '+' : '−'} ${Math.abs(sec).toFixed(1)} s`

/** Plans the cues at one site under the rule. */
export function planCues(input: CueInput): CuePlan {
  const margins = effectiveMargins(input.margins)
  const window = filtersOffWindow(input)
  const offsets = input.offsets ?? {}
  const defs = CUE_DEFINITIONS.filter((d) => d.for.includes(input.kind) && input.contacts[d.anchor])
  const asked = (d: CueDefinition) => input.contacts[d.anchor]!.utcMs + (offsets[d.key] ?? d.offsetSec) * 1000
  const cues: PlannedCue[] = []
  const push = (d: CueDefinition, utcMs: number, adjusted?: string) => {
    const anchorMs = input.contacts[d.anchor]!.utcMs
    cues.push({ key: d.key, anchor: d.anchor, offsetSec: Math.round((utcMs - anchorMs) / 100) / 10, utcMs, label: labelFor(d.key, input, utcMs), filters: d.filters, ...(adjusted ? { adjusted } : {}) })
  }
  const offKey = (k: string) => k === 'filters-off' || k === 'filters-on' || defs.find((d) => d.key === k)?.filters === 'off'
  for (const d of defs) if (!offKey(d.key)) push(d, asked(d))
  let notice: string | null = null
  if (input.kind === 'total') {
    const offDef = defs.find((d) => d.key === 'filters-off')
    const onDef = defs.find((d) => d.key === 'filters-on')
    if (!window || !offDef || !onDef) {
      notice = translate(input.locale, 'doc.cues.tooShort')
      // No filters-off cue at all: the group keeps filters on through the short totality.
      const c2 = input.contacts.c2
      if (c2) cues.push({ key: 'keep-filters-on', anchor: 'c2', offsetSec: 0, utcMs: c2.utcMs, label: translate(input.locale, 'doc.cues.keepOn'), filters: 'on' })
    } else {
      // The defaults are placed, and edits kept, inside the window; anything outside moves to its safe side.
      const why = (a: number, b: number) => (Math.abs(a - b) > 50 ? 'moved inside the safe window for filters off' : undefined)
      const offAsk = asked(offDef)
      const offAt = clamp(offAsk, window.startMs, window.endMs)
      const onAsk = asked(onDef)
      const onAt = clamp(onAsk, offAt, window.endMs)
      push(offDef, offAt, offsets[offDef.key] === undefined ? undefined : why(offAsk, offAt))
      for (const d of defs) {
        if (d.filters !== 'off' || d.key === 'filters-off') continue
        const a = asked(d)
        const at = clamp(a, offAt, onAt)
        push(d, at, offsets[d.key] === undefined ? undefined : why(a, at))
      }
      push(onDef, onAt, offsets[onDef.key] === undefined ? undefined : why(onAsk, onAt))
    }
  }
  // Sorted by time; at equal times, filters-off cues after filters-on ones (never off before on).
  cues.sort((a, b) => a.utcMs - b.utcMs || (a.filters === b.filters ? 0 : a.filters === 'on' ? -1 : 1))
  return { kind: input.kind, cues, window, notice, margins }
}

/**
 * Checks offsets a guide wants to save against the rule at one site. Returns one message per cue
 * that would fall outside the window (or put filters back on before they come off), naming the cue
 * and the range allowed; an empty list when the edit is safe here.
 */
export function cueOffsetProblems(input: CueInput, siteName: string): Array<{ key: string; message: string }> {
  const window = filtersOffWindow(input)
  if (!window) return []
  const offsets = input.offsets ?? {}
  const problems: Array<{ key: string; message: string }> = []
  const defs = CUE_DEFINITIONS.filter((d) => d.for.includes(input.kind) && input.contacts[d.anchor])
  const at = (d: CueDefinition) => input.contacts[d.anchor]!.utcMs + (offsets[d.key] ?? d.offsetSec) * 1000
  const range = (d: CueDefinition, lo: number, hi: number) => {
    const a = input.contacts[d.anchor]!.utcMs
    return `${fmtOffset(d.anchor, (lo - a) / 1000)} to ${fmtOffset(d.anchor, (hi - a) / 1000)}`
  }
  const offDef = defs.find((d) => d.key === 'filters-off')
  const onDef = defs.find((d) => d.key === 'filters-on')
  // Where planCues puts "filters-off" and "filters-on": the other filters-off cues are kept between the two,
  // so one asked outside them would be moved; it is refused here instead, naming the range.
  const offAt = offDef ? Math.max(window.startMs, Math.min(at(offDef), window.endMs)) : window.startMs
  const onAt = onDef ? Math.max(offAt, Math.min(at(onDef), window.endMs)) : window.endMs
  for (const d of defs) {
    if (d.filters !== 'off' || offsets[d.key] === undefined) continue
    const t = at(d)
    if (t < window.startMs || t > window.endMs) {
      problems.push({ key: d.key, message: `"${d.key}" calls for filters off but at ${fmtOffset(d.anchor, offsets[d.key]!)} it falls outside the safe window at ${siteName}; allowed: ${range(d, window.startMs, window.endMs)}` })
    } else if (d.key !== 'filters-off' && (t < offAt || t > onAt)) {
      problems.push({ key: d.key, message: `"${d.key}" at ${fmtOffset(d.anchor, offsets[d.key]!)} falls outside the time between "filters-off" and "filters-on" at ${siteName}; allowed: ${range(d, offAt, onAt)}` })
    }
  }
  if (onDef && offsets[onDef.key] !== undefined) {
    const t = at(onDef)
    if (t > window.endMs || t < offAt) {
      problems.push({ key: onDef.key, message: `"filters-on" at ${fmtOffset('c3', offsets[onDef.key]!)} would leave filters off outside the safe window at ${siteName}; allowed: ${range(onDef, offAt, window.endMs)}` })
    }
  }
  return problems
}

/** The phase words for a plan, re-exported for convenience. */
export { phaseWords }
