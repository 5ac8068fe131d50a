/**
 * Signs out: the session version is raised, so this cookie (and any copy of it) is refused from now
 * on, not merely forgotten by this browser.
 */
export default defineEventHandler(async (event) => {
  const session = await getUserSession(event)
  const id = (session.user as { id?: number } | undefined)?.id
  if (id) await endAllSessions(id)
  await clearUserSession(event)
  return { ok: true }
})
