import { listDatasets } from '../../services/climatology'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser', 'guide')
  const data = await listDatasets(useDb())
  return { data, meta: { total: data.length } }
})
