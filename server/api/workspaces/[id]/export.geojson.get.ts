import { IdParams } from '#shared/schemas/auth'
import { exportWorkspace } from '../../../services/workspaceExport'
import { assertWorkspaceAccess } from '../../../services/planning'

export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  await withServiceErrors(() => assertWorkspaceAccess(useDb(), user, id))
  return withServiceErrors(() => exportWorkspace(event, useDb(), id, 'geojson'))
})
