import { IdParams } from '#shared/schemas/auth'
import { retryMessage } from '../../../services/outbox'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const r = await retryMessage(useDb(), id)
  if (r === 'not_failed') throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'Only failed messages can be retried' })
  if (r === 'link_gone') throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'This message carried a one-time link that was cleared when it failed: the person asks for a new link instead', data: { code: 'link_gone' } })
  return { ok: true }
})
