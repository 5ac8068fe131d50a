import { AlertsRead } from '#shared/schemas/operations'
import { markAlertsRead } from '../../services/operations/alerts'

/** Marks the caller's alerts read: { ids: [...] } or { all: true }. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const which = await readBodyAs(event, AlertsRead)
  return markAlertsRead(useDb(), user, which)
})
