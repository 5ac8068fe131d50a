/**
 * Umbrafield's one eye-safety text and the words it uses for each kind of local eclipse.
 * Every output — trip page, booking and itinerary e-mails, calendar files, the timetable and its
 * PDF, the countdown — takes its safety lines and its phase names from here.
 *
 * Common practice of eclipse safety guidance (AAS, IAU and national optometry bodies; from memory):
 * ISO 12312-2 covers viewers for looking at the Sun directly (eclipse glasses, hand-held viewers);
 * filters for optics are separate, purpose-made solar filters mounted on the front of the instrument.
 */

import { translate, translator } from '../i18n/translate'

/** What is seen at the site: hybrid eclipses resolve to total or annular there. */
export type LocalKind = 'total' | 'annular' | 'partial'

export interface PhaseWords {
  /** e.g. "Total solar eclipse". */
  eclipseName: string
  /** The same name within a sentence ("total solar eclipse"; German keeps its capital noun). */
  eclipseInline: string
  /** The central phase in words ("totality", "annularity"), or null where there is none. */
  central: string | null
  contact: Record<'c1' | 'c2' | 'max' | 'c3' | 'c4', string>
}

export function phaseWords(kind: LocalKind, locale?: string | null): PhaseWords {
  const t = translator(locale)
  const at = (k: string) => t(`safety.phase.${kind}.${k}`)
  return {
    eclipseName: at('name'), eclipseInline: at('inline'), central: kind === 'partial' ? null : at('central'),
    contact: { c1: at('c1'), c2: at('c2'), max: at('max'), c3: at('c3'), c4: at('c4') },
  }
}

/** Maps an engine type ('none' included) to what the wording should follow. */
export function localKindOf(type: string): LocalKind {
  return type === 'total' ? 'total' : type === 'annular' ? 'annular' : 'partial'
}

// Umbrafield's own wording, in every language in i18n/locales/<code>/safety.json. What it must keep:
// ISO 12312-2 viewers for looking straight at the Sun, solar filters over the front of any optics,
// never the naked eye on a partial or annular phase, and local rules and qualified advice come first.
/** The lines every kind shares, in the order they are shown; the filter line goes before the final one. */
export const SAFETY_COMMON_KEYS = ['viewer', 'optics', 'inspect', 'children', 'nakedEye'] as const

/** The filter line's key for a kind of local eclipse; without a kind, the general wording. */
export function filterLineKey(kind?: LocalKind): 'filtersTotal' | 'filtersKept' | 'filtersGeneral' {
  return kind === 'total' ? 'filtersTotal' : kind === 'annular' || kind === 'partial' ? 'filtersKept' : 'filtersGeneral'
}

/**
 * The safety lines for a kind of local eclipse (without a kind, the general wording), in a
 * locale (English by default). Never implies that removing filters is safe outside totality.
 */
export function safetyLines(kind?: LocalKind, locale?: string | null): string[] {
  const t = translator(locale)
  return [...SAFETY_COMMON_KEYS, filterLineKey(kind), 'final'].map((k) => t(`safety.lines.${k}`))
}

/** The safety lines as one paragraph (calendar descriptions, short notes). */
export function safetyParagraph(kind?: LocalKind, locale?: string | null): string {
  return translate(locale, 'safety.paragraph', { lines: safetyLines(kind, locale).join(' ') })
}

/** "Eye safety" as a heading, in a locale. */
export function safetyTitle(locale?: string | null): string {
  return translate(locale, 'safety.title')
}
