import { WorkspaceCreate } from '#shared/schemas/sites'
import { createWorkspace } from '../../services/planning'

export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const body = await readBodyAs(event, WorkspaceCreate)
  const ws = await withServiceErrors(() => createWorkspace(useDb(), user, body))
  setResponseStatus(event, 201)
  return ws
})
