import { IdParams } from '#shared/schemas/auth'
import { ChecklistUpdate } from '#shared/schemas/trips'
import { setChecklist } from '../../../services/briefing'

/** Replaces the briefing's "what to bring" list of a trip (organisers). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const { items } = await readBodyAs(event, ChecklistUpdate)
  return withServiceErrors(() => setChecklist(useDb(), user, id, items))
})
