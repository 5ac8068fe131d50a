import { IdParams } from '#shared/schemas/auth'
import { CueOffsetsBody } from '#shared/schemas/cues'
import { assertTimetableAccess, setCueOffsets } from '../../../services/timetable'

/**
 * The trip's guides (and organisers) set cue offsets in seconds from their contact; organisers may
 * also widen the filters-off margins. An edit that breaks the cue rule at any site is a 400 naming
 * the cue and the range allowed.
 */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  // Reach first: a guide not on this trip learns nothing about it, not even what a valid body is.
  await withServiceErrors(() => assertTimetableAccess(useDb(), user, id))
  const { offsets, margins } = await readBodyAs(event, CueOffsetsBody)
  if (margins && user.role !== 'organiser') throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'Only organisers set the safety margins' })
  await withServiceErrors(() => setCueOffsets(useDb(), user, id, offsets, margins))
  return { ok: true, offsets, margins }
})
