import { bookingView } from '../../services/bookings'

/** The caller's own bookings. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const db = useDb()
  const rows = await db.selectFrom('bookings').selectAll().where('user_id', '=', user.id).orderBy('id', 'desc').execute()
  const data = await Promise.all(rows.map((b) => bookingView(db, b)))
  return { data, meta: { total: data.length } }
})
