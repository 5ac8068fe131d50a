export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const rows = await useDb().selectFrom('users').selectAll().orderBy('role', 'desc').orderBy('name').execute()
  // Each account's language too: organisers see which language its e-mails go out in.
  return { data: rows.map((u) => ({ ...toPublicUser(u), locale: u.locale })), meta: { total: rows.length } }
})
