import { listWorkspaces } from '../../services/planning'

export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const data = await listWorkspaces(useDb(), user)
  return { data, meta: { total: data.length } }
})
