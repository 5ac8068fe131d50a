import { IdParams } from '#shared/schemas/auth'
import { WorkspacePatch } from '#shared/schemas/sites'
import { updateWorkspace } from '../../../services/planning'

/** Rename a workspace or choose its climatology dataset (organisers). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const patch = await readBodyAs(event, WorkspacePatch)
  return withServiceErrors(() => updateWorkspace(useDb(), user, id, patch))
})
