import { IdParams } from '#shared/schemas/auth'
import { listSites, assertWorkspaceAccess } from '../../../../services/planning'

export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  await withServiceErrors(() => assertWorkspaceAccess(useDb(), user, id))
  const data = await withServiceErrors(() => listSites(useDb(), id))
  return { data, meta: { total: data.length } }
})
