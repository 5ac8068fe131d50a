import { IdParams } from '#shared/schemas/auth'
import { deleteVoyage } from '../../../services/sea/voyages'

/** Removes a voyage (organisers). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  await withServiceErrors(() => deleteVoyage(useDb(), user, id))
  return { ok: true }
})
