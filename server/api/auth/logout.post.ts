/**
 * Signs out: the session version is raised, so this cookie (and any copy of it) is refused from now
 * on, not merely forgotten by this browser. An already-ended cookie only clears itself.
 */
export default defineEventHandler(async (event) => {
  const session = await getUserSession(event)
  const id = (session.user as { id?: number } | undefined)?.id
  const version = (session as { version?: number }).version
  if (id && typeof version === 'number') await endAllSessions(id, version)
  await clearUserSession(event)
  return { ok: true }
})
