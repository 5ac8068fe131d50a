import { SecuritySettingsPatch } from '#shared/schemas/totp'
import { updateSecuritySettings } from '../../services/totp'

/** Changes app-wide security settings (organisers; audited). */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'organiser')
  const patch = await readBodyAs(event, SecuritySettingsPatch)
  return updateSecuritySettings(useDb(), actor, patch, clientIp(event))
})
