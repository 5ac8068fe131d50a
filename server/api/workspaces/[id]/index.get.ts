import { IdParams } from '#shared/schemas/auth'
import { getWorkspace, assertWorkspaceAccess } from '../../../services/planning'
import { climatologyCoverage } from '../../../services/planningDetails'
import { cloudWeightsOf } from '../../../services/climatology'

export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  await withServiceErrors(() => assertWorkspaceAccess(useDb(), user, id))
  const w = await withServiceErrors(() => getWorkspace(useDb(), id))
  const coverage = await climatologyCoverage(useDb(), w)
  return { id: w.id, eclipseId: w.eclipse_id, name: w.name, createdAt: w.created_at, climatologyId: w.climatology_id, coverage, cloudWeights: cloudWeightsOf(w) }
})
