/** "Sign out everywhere": every session of the caller, on every device, ends now. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { totpSetup: true })
  await endAllSessions(user.id, user.session_version)
  await clearUserSession(event)
  return { ok: true }
})
