import { IdParams } from '#shared/schemas/auth'
import { exportWorkspace } from '../../../services/workspaceExport'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(() => exportWorkspace(event, useDb(), id, 'csv'))
})
