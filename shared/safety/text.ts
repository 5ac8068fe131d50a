/**
 * Umbrafield's one eye-safety text and the words it uses for each kind of local eclipse.
 * Every output — trip page, booking and itinerary e-mails, calendar files, the timetable and its
 * PDF, the countdown — takes its safety lines and its phase names from here.
 *
 * Common practice of eclipse safety guidance (AAS, IAU and national optometry bodies; from memory):
 * ISO 12312-2 covers viewers for looking at the Sun directly (eclipse glasses, hand-held viewers);
 * filters for optics are separate, purpose-made solar filters mounted on the front of the instrument.
 */

/** What is seen at the site: hybrid eclipses resolve to total or annular there. */
export type LocalKind = 'total' | 'annular' | 'partial'

export interface PhaseWords {
  /** e.g. "Total solar eclipse". */
  eclipseName: string
  /** The central phase in words ("totality", "annularity"), or null where there is none. */
  central: string | null
  contact: Record<'c1' | 'c2' | 'max' | 'c3' | 'c4', string>
}

export function phaseWords(kind: LocalKind): PhaseWords {
  if (kind === 'total') {
    return {
      eclipseName: 'Total solar eclipse', central: 'totality',
      contact: { c1: 'C1 — partial phase begins', c2: 'C2 — totality begins', max: 'Maximum eclipse', c3: 'C3 — totality ends', c4: 'C4 — partial phase ends' },
    }
  }
  if (kind === 'annular') {
    return {
      eclipseName: 'Annular solar eclipse', central: 'annularity',
      contact: { c1: 'C1 — partial phase begins', c2: 'C2 — annularity begins', max: 'Maximum eclipse', c3: 'C3 — annularity ends', c4: 'C4 — partial phase ends' },
    }
  }
  return {
    eclipseName: 'Partial solar eclipse', central: null,
    contact: { c1: 'C1 — partial eclipse begins', c2: 'C2', max: 'Maximum eclipse', c3: 'C3', c4: 'C4 — partial eclipse ends' },
  }
}

/** Maps an engine type ('none' included) to what the wording should follow. */
export function localKindOf(type: string): LocalKind {
  return type === 'total' ? 'total' : type === 'annular' ? 'annular' : 'partial'
}

// Umbrafield's own wording. What it must keep: ISO 12312-2 viewers for looking straight at the Sun,
// solar filters over the front of any optics, never the naked eye on a partial or annular phase,
// and local rules and qualified advice come first.
const COMMON_BEFORE = [
  'Any direct look at the Sun goes through an ISO 12312-2 eclipse viewer (card glasses or a hand-held viewer).',
  'Optics gather sunlight: a lens, binocular or telescope gets a proper solar filter over its front end, held on firmly, and a viewer worn behind the eyepiece protects nothing.',
  'Hold each viewer and filter up to the light before the day starts; one with a hole, a scratch or a loose fit is set aside, not used.',
  'Young observers stay within an adult\'s reach, with the viewer on, whenever they look up.',
  'Never watch an annular or partial phase with the naked eye: the uncovered part of the Sun can still burn the retina.',
]
const FINAL = 'Local rules and qualified advice come first.'

/**
 * The safety lines for a kind of local eclipse; without a kind, the general wording.
 * Never implies that removing filters is safe outside totality.
 */
export function safetyLines(kind?: LocalKind): string[] {
  const filters = kind === 'total'
    ? 'Filters come off only during totality, at the guide\'s cue once the bright surface is completely covered, and go back on at the cue before totality ends.'
    : kind === 'annular' || kind === 'partial'
      ? 'At this site the Sun\'s bright surface is never completely covered: keep viewers and filters on throughout.'
      : 'Filters come off only during totality at a total eclipse, at the guide\'s cue; at an annular or partial eclipse they stay on throughout.'
  return [...COMMON_BEFORE, filters, FINAL]
}

/** The safety lines as one paragraph (calendar descriptions, short notes). */
export function safetyParagraph(kind?: LocalKind): string {
  return `Eye safety: ${safetyLines(kind).join(' ')}`
}
