import { z } from 'zod'

export type CueAnchor = 'c1' | 'c2' | 'max' | 'c3' | 'c4'

/** A default cue: where it hangs (a contact) and its offset in seconds. `central` cues only exist for total/annular sites. */
export interface CueDefault {
  key: string
  anchor: CueAnchor
  offsetSec: number
  /** Which local eclipse types the cue applies to. */
  for: Array<'total' | 'annular' | 'partial'>
  label: string
  /** Filter state this cue calls for, shown beside it. */
  filters: 'on' | 'off' | 'unchanged'
}

/**
 * Default cue list (common practice of eclipse guides). Offsets are stored per trip.
 * An annular or partial eclipse never gets a "filters off" cue.
 */
export const DEFAULT_CUES: CueDefault[] = [
  { key: 'partial-begins', anchor: 'c1', offsetSec: 0, for: ['total', 'annular', 'partial'], label: 'Partial phase begins — eclipse viewers on', filters: 'on' },
  { key: 'shadow', anchor: 'c2', offsetSec: -120, for: ['total'], label: 'Watch the western sky for the approaching shadow; look for shadow bands on light ground', filters: 'on' },
  { key: 'beads', anchor: 'c2', offsetSec: -12, for: ['total'], label: "Baily's beads — keep filters ON until the last bead has gone", filters: 'on' },
  { key: 'filters-off', anchor: 'c2', offsetSec: 0, for: ['total'], label: 'Totality — filters off, only now that the bright surface is fully covered', filters: 'off' },
  { key: 'chromosphere', anchor: 'c2', offsetSec: 5, for: ['total'], label: 'Chromosphere and prominences at the Moon’s edge, then the corona', filters: 'off' },
  { key: 'planets', anchor: 'max', offsetSec: 0, for: ['total'], label: 'Look for planets and bright stars', filters: 'off' },
  { key: 'filters-on', anchor: 'c3', offsetSec: -10, for: ['total'], label: 'Filters back ON — totality ends in 10 s', filters: 'on' },
  { key: 'annularity', anchor: 'c2', offsetSec: 0, for: ['annular'], label: 'Annularity begins — the ring of fire; filters stay ON throughout', filters: 'on' },
  { key: 'annularity-ends', anchor: 'c3', offsetSec: 0, for: ['annular'], label: 'Annularity ends — filters stay ON', filters: 'on' },
  { key: 'maximum', anchor: 'max', offsetSec: 0, for: ['annular', 'partial'], label: 'Maximum eclipse — filters stay ON', filters: 'on' },
  { key: 'partial-ends', anchor: 'c4', offsetSec: 0, for: ['total', 'annular', 'partial'], label: 'Partial phase ends', filters: 'on' },
]

export const CueOffsetsBody = z.object({
  offsets: z.record(z.string(), z.number({ error: 'offsets must be seconds' }).int('whole seconds').min(-1800, 'at most 30 minutes before').max(1800, 'at most 30 minutes after')),
}).superRefine((v, ctx) => {
  for (const k of Object.keys(v.offsets)) if (!DEFAULT_CUES.some((c) => c.key === k)) ctx.addIssue({ code: 'custom', path: ['offsets', k], message: `unknown cue "${k}"` })
  // Filters off can only ever be at or after C2; never before the bright surface is covered.
  if ((v.offsets['filters-off'] ?? 0) < 0) ctx.addIssue({ code: 'custom', path: ['offsets', 'filters-off'], message: 'filters off cannot be before C2' })
  if ((v.offsets['filters-on'] ?? 0) > 0) ctx.addIssue({ code: 'custom', path: ['offsets', 'filters-on'], message: 'filters back on cannot be after C3' })
})

/** Safety block shown on every timetable and countdown (common practice; defer to local rules). */
export const SAFETY_LINES = [
  'Use eclipse viewers and filters that meet ISO 12312-2, for every partial phase.',
  'Inspect every viewer and filter before use; throw away any that are scratched, punctured or torn.',
  'Never look through binoculars, cameras or telescopes without a solar filter on the front of the optics.',
  'Supervise children at all times.',
  'An annular or partial phase is never safe to look at with the naked eye.',
  'Follow local rules and the advice of qualified people on site.',
]
