import { IdParams } from '#shared/schemas/auth'
import { cloudLayer } from '../../../services/cloudLayer'
import { assertWorkspaceAccess } from '../../../services/planning'

export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  await withServiceErrors(() => assertWorkspaceAccess(useDb(), user, id))
  return withServiceErrors(async () => (await cloudLayer(useDb(), id)) ?? { none: true })
})
