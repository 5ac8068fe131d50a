import { listTrips } from '../../services/trips'

/** Published trips for everyone; drafts too for organisers. */
export default defineEventHandler(async (event) => {
  const session = await getUserSession(event)
  const user = session.user ? await requireUser(event) : null
  const data = await listTrips(useDb(), user)
  return { data, meta: { total: data.length } }
})
