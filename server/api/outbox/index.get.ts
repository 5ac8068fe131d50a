import { listOutbox } from '../../services/outbox'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const data = await listOutbox(useDb())
  return { data, meta: { total: data.length, queued: data.filter((m) => m.status === 'queued').length, failed: data.filter((m) => m.status === 'failed').length } }
})
