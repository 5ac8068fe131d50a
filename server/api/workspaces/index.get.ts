import { listWorkspaces } from '../../services/planning'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser', 'guide')
  const data = await listWorkspaces(useDb())
  return { data, meta: { total: data.length } }
})
