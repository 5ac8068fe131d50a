import { IdParams } from '#shared/schemas/auth'
import { assertWorkspaceAccess } from '../../../../services/planning'
import { listTerrain } from '../../../../services/terrain'

export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  const db = useDb()
  await withServiceErrors(() => assertWorkspaceAccess(db, user, id))
  return { data: await listTerrain(db, id) }
})
