export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const rows = await useDb().selectFrom('users').selectAll().orderBy('role', 'desc').orderBy('name').execute()
  return { data: rows.map(toPublicUser), meta: { total: rows.length } }
})
