import { compassWords, planCues, type CueInput, type CuePlan } from '../safety/cues'
import type { LocalKind } from '../safety/text'
import { localTime } from '../time/local'

/**
 * What a participant will see at their site, step by step, in local time and UTC — built from the
 * site's contacts and the one cue rule (shared/safety/cues.ts), so that no step ever says filters may
 * be off outside the rule's window. Steps marked commonPractice carry timings from guides' experience,
 * not from the ephemeris, and say so.
 */

export interface BriefingContact { utc: string; altitudeDeg: number; azimuthDeg: number; direction?: string }
export interface BriefingSky { name: string; kind: 'planet' | 'star'; altitudeDeg: number; azimuthDeg: number; magnitude: number }

export interface BriefingInput {
  kind: LocalKind
  zone: string
  durationSec: number
  contacts: Partial<Record<'c1' | 'c2' | 'max' | 'c3' | 'c4', BriefingContact>>
  /** The cue rule's input for this site (contacts with uncertainties, offsets, margins, shadow direction). */
  cueInput: CueInput
  /** Planets and bright stars at maximum (any altitude: the builder keeps what is up). */
  sky: BriefingSky[]
  /** The corona sentence for the date (solar-cycle phase). */
  coronaShape?: string
}

export interface BriefingStep {
  key: string
  utc: string
  local: string
  utcOffset: string
  title: string
  text: string
  /** What the eyes need at this step: 'on' = viewers and filters on; 'off' only inside the cue rule's window. */
  filters: 'on' | 'off'
  commonPractice: boolean
}

export interface Briefing { steps: BriefingStep[]; plan: CuePlan; visible: BriefingSky[]; notice: string | null }

const mmss = (sec: number) => `${Math.floor(sec / 60)} min ${Math.round(sec % 60)} s`

/**
 * What the dark minutes usually show (common practice: totality's sky is like deep twilight): the
 * planets above 3°, and the four brightest stars of magnitude 0.5 or brighter above 15°; brightest first.
 */
export function visibleInTheDark(sky: BriefingSky[]): BriefingSky[] {
  const planets = sky.filter((o) => o.kind === 'planet' && o.altitudeDeg > 3 && o.magnitude < 2.5)
  const stars = sky.filter((o) => o.kind === 'star' && o.altitudeDeg > 15 && o.magnitude <= 0.5).sort((a, b) => a.magnitude - b.magnitude).slice(0, 4)
  return [...planets, ...stars].sort((a, b) => a.magnitude - b.magnitude)
}

export function briefingSequence(input: BriefingInput): Briefing {
  const plan = planCues(input.cueInput)
  const cue = (key: string) => plan.cues.find((c) => c.key === key)
  const steps: Omit<BriefingStep, 'local' | 'utcOffset'>[] = []
  // Tenths of a second; times inside the filters-off window are rounded towards its inside.
  const at = (ms: number, towards: 'nearest' | 'later' | 'earlier' = 'nearest') =>
    new Date((towards === 'later' ? Math.ceil : towards === 'earlier' ? Math.floor : Math.round)(ms / 100) * 100).toISOString()
  const ms = (k: keyof BriefingInput['contacts']) => (input.contacts[k] ? Date.parse(input.contacts[k]!.utc) : null)
  const c1 = ms('c1'), c2 = ms('c2'), max = ms('max'), c3 = ms('c3'), c4 = ms('c4')
  const where = (k: 'c1' | 'c2' | 'c3') => input.contacts[k]?.direction ? ` ${input.contacts[k]!.direction}` : ''
  const visible = visibleInTheDark(input.sky)
  const skyWords = visible.map((o) => `${o.name} ${Math.round(o.altitudeDeg)}° up in the ${compassWords(o.azimuthDeg)}`).join('; ')

  if (c1 !== null) {
    steps.push({ key: 'partial-begins', utc: at(c1), title: 'The partial phase begins (C1)', filters: 'on', commonPractice: false,
      text: `The Moon's edge first touches the Sun${where('c1')}. Watch through your eclipse viewer only.` })
  }

  if (input.kind === 'total' && c2 !== null && c3 !== null && max !== null) {
    const window = plan.window
    steps.push({ key: 'light', utc: at(c2 - 15 * 60_000), title: 'The light changes', filters: 'on', commonPractice: true,
      text: 'From about a quarter of an hour before totality the daylight turns flat and steely, and shadows grow sharp (common practice: when it becomes noticeable varies).' })
    steps.push({ key: 'temperature', utc: at(c2 - 10 * 60_000), title: 'The air cools', filters: 'on', commonPractice: true,
      text: 'The temperature often drops by a few degrees, and a breeze may rise (common practice: it depends on the weather and the ground).' })
    const shadow = cue('shadow')
    if (shadow) {
      steps.push({ key: 'shadow', utc: at(shadow.utcMs), title: 'The shadow approaches', filters: 'on', commonPractice: false,
        text: `The Moon's shadow comes from ${input.cueInput.shadowFrom ? `the ${input.cueInput.shadowFrom}` : 'the west'}: look low in that direction for the darkening sky. Keep your viewer on for the Sun.` })
    }
    steps.push({ key: 'shadow-bands', utc: at(c2 - 60_000), title: 'Shadow bands may ripple', filters: 'on', commonPractice: true,
      text: 'In the last minute or two, faint wavy bands may run across light-coloured ground or a white sheet. They are not always seen (common practice).' })
    const beads = cue('beads')
    if (beads) {
      steps.push({ key: 'beads', utc: at(beads.utcMs), title: 'Baily\'s beads and the diamond ring', filters: 'on', commonPractice: false,
        text: `The last sunlight breaks into beads, then a single bright point, the diamond ring${where('c2') ? `,${where('c2')} on the Sun's disc` : ''}. Filters stay on until the guide's cue.` })
    }
    if (window) {
      // Filters-off steps sit inside the window (a tenth of a second in), whatever margins the organiser chose.
      const inWindow = (t: number) => Math.min(Math.max(t, window.startMs + 100), window.endMs - 100)
      steps.push({ key: 'filters-off', utc: at(window.startMs, 'later'), title: 'Filters off: totality (at the guide\'s cue)', filters: 'off', commonPractice: false,
        text: `Only now, once the bright surface is completely covered and the guide calls it, may viewers and filters come off. Totality lasts ${mmss(input.durationSec)} here.` })
      const chrom = cue('chromosphere')
      if (chrom) {
        steps.push({ key: 'chromosphere', utc: at(inWindow(chrom.utcMs)), title: 'Chromosphere and prominences', filters: 'off', commonPractice: false,
          text: `A thin pink arc and small red prominences show at the Moon's edge${where('c2')}, on the side where the diamond ring was.` })
      }
      steps.push({ key: 'corona', utc: at(inWindow(max)), title: 'The corona', filters: 'off', commonPractice: false,
        text: `${input.coronaShape ?? 'The pearly corona surrounds the black Moon.'} Look with the naked eye or binoculars without filters — only during totality.` })
      if (visible.length) {
        steps.push({ key: 'planets', utc: at(inWindow(max)), title: 'Planets and bright stars', filters: 'off', commonPractice: false, text: `In the darkened sky: ${skyWords}.` })
      }
      steps.push({ key: 'filters-on', utc: at(window.endMs, 'earlier'), title: 'Filters back on', filters: 'on', commonPractice: false,
        text: 'At the guide\'s cue, before totality ends: viewers and filters back on, and off the naked eye.' })
    } else {
      steps.push({ key: 'too-short', utc: at(c2), title: 'Totality here is too short for filters off', filters: 'on', commonPractice: false,
        text: `${plan.notice ?? ''} Watch the change in the landscape and the sky instead.`.trim() })
    }
    steps.push({ key: 'c3', utc: at(c3), title: 'Totality ends (C3): the reverse', filters: 'on', commonPractice: false,
      text: `The diamond ring flares${where('c3')}, then the beads and the crescent return; the shadow races away to the ${input.cueInput.shadowFrom ? oppositeOf(input.cueInput.shadowFrom) : 'east'}. Shadow bands may show again.` })
  } else if (input.kind === 'annular' && c2 !== null && c3 !== null) {
    steps.push({ key: 'light', utc: at(c2 - 10 * 60_000), title: 'The light dims a little', filters: 'on', commonPractice: true,
      text: 'The daylight weakens and shadows sharpen, but the sky stays bright (common practice).' })
    steps.push({ key: 'annularity', utc: at(c2), title: 'The ring forms (C2)', filters: 'on', commonPractice: false,
      text: `The Moon sits wholly inside the Sun and a thin ring of sunlight remains, for ${mmss(input.durationSec)}. The ring is still the Sun's surface: viewers and filters stay on throughout.` })
    if (max !== null) steps.push({ key: 'maximum', utc: at(max), title: 'Maximum eclipse', filters: 'on', commonPractice: false, text: 'The ring is most even. Keep your viewer on.' })
    steps.push({ key: 'annularity-ends', utc: at(c3), title: 'The ring breaks (C3)', filters: 'on', commonPractice: false, text: 'The ring breaks and the crescent returns. Keep your viewer on.' })
  } else if (max !== null) {
    steps.push({ key: 'maximum', utc: at(max), title: 'Maximum eclipse', filters: 'on', commonPractice: false, text: 'The Sun is most covered here, but never completely: keep your viewer on throughout.' })
  }

  if (c4 !== null) {
    steps.push({ key: 'partial-ends', utc: at(c4), title: 'The eclipse ends (C4)', filters: 'on', commonPractice: false,
      text: 'The Moon leaves the Sun\'s disc. Viewers on until the very end.' })
  }
  const out = steps.map((s) => ({ ...s, ...pick(localTime(Date.parse(s.utc), input.zone)) })).sort((a, b) => a.utc.localeCompare(b.utc))
  return { steps: out, plan, visible, notice: plan.notice }
}

const pick = (l: { local: string; utcOffset: string }) => ({ local: l.local, utcOffset: l.utcOffset })

const OPPOSITE: Record<string, string> = { north: 'south', south: 'north', east: 'west', west: 'east' }
function oppositeOf(words: string): string {
  return words.split('-').map((w) => w.replace(/north|south|east|west/g, (m) => OPPOSITE[m]!)).join('-')
}
