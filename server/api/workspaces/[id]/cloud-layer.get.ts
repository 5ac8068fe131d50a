import { IdParams } from '#shared/schemas/auth'
import { cloudLayer } from '../../../services/cloudLayer'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(async () => (await cloudLayer(useDb(), id)) ?? { none: true })
})
