import { securitySettings } from '../../services/totp'

/** App-wide security settings (organisers). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  return securitySettings(useDb())
})
