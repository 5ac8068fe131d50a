import { listAlerts } from '../../services/operations/alerts'

/** The caller's alerts about trips (organisers), newest first, with the unread count and their mail choice. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  return listAlerts(useDb(), user)
})
