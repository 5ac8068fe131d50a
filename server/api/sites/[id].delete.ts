import { IdParams } from '#shared/schemas/auth'
import { deleteSite } from '../../services/planning'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  await withServiceErrors(() => deleteSite(useDb(), id))
  return { ok: true }
})
