import { IdParams } from '#shared/schemas/auth'
import { CueOffsetsBody } from '#shared/schemas/cues'
import { assertTimetableAccess, setCueOffsets } from '../../../services/timetable'

/** The trip's guides (and organisers) set cue offsets in seconds from their contact. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  const { offsets } = await readBodyAs(event, CueOffsetsBody)
  await withServiceErrors(async () => { await assertTimetableAccess(useDb(), user, id); await setCueOffsets(useDb(), user, id, offsets) })
  return { ok: true, offsets }
})
