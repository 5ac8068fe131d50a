import { IdParams } from '#shared/schemas/auth'
import { tripMessages } from '../../../../services/operations/messages'

/** The trip's messages to its group, newest first (organisers). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(() => tripMessages(useDb(), id))
})
