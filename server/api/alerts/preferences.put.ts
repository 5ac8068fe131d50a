import { AlertPreference } from '#shared/schemas/operations'
import { setAlertMode } from '../../services/operations/alerts'

/** The caller's choice: each alert mailed at once ('immediate') or one digest a business day ('digest'). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { mode } = await readBodyAs(event, AlertPreference)
  return setAlertMode(useDb(), user, mode)
})
