import { z } from 'zod'
import { CUE_KEYS, MIN_MARGIN_END_SEC, MIN_MARGIN_SIGMAS } from '../safety/cues'

/**
 * A cue edit: offsets in seconds from each cue's contact, and (organisers only) wider margins for
 * the filters-off window. Whether a filters-off cue stays inside every site's window is checked by
 * the service against the trip's sites (shared/safety/cues.ts); this schema checks the shape.
 */
export const CueOffsetsBody = z.object({
  offsets: z.record(z.string(), z.number({ error: 'offsets must be seconds' }).int('whole seconds').min(-1800, 'at most 30 minutes before').max(1800, 'at most 30 minutes after')),
  margins: z.object({
    sigmas: z.number().min(MIN_MARGIN_SIGMAS, `at least ${MIN_MARGIN_SIGMAS} σ: margins can be widened, never narrowed`).max(10, 'at most 10 σ'),
    endSec: z.number().min(MIN_MARGIN_END_SEC, `at least ${MIN_MARGIN_END_SEC} s: margins can be widened, never narrowed`).max(120, 'at most 120 s'),
  }).optional(),
}).superRefine((v, ctx) => {
  for (const k of Object.keys(v.offsets)) if (!CUE_KEYS.includes(k)) ctx.addIssue({ code: 'custom', path: ['offsets', k], message: `unknown cue "${k}"` })
})
export type CueOffsetsInput = z.infer<typeof CueOffsetsBody>
