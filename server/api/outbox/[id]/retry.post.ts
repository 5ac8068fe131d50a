import { IdParams } from '#shared/schemas/auth'
import { retryMessage } from '../../../services/outbox'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  if (!(await retryMessage(useDb(), id))) throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'Only failed messages can be retried' })
  return { ok: true }
})
