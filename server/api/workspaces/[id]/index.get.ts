import { IdParams } from '#shared/schemas/auth'
import { getWorkspace } from '../../../services/planning'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  const w = await withServiceErrors(() => getWorkspace(useDb(), id))
  return { id: w.id, eclipseId: w.eclipse_id, name: w.name, createdAt: w.created_at, climatologyId: w.climatology_id }
})
