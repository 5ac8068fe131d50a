import { listDatasets } from '../../services/climatology'

/** Climatology datasets: every one for organisers; a guide's, only those their guided trips' workspaces use. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const data = await listDatasets(useDb(), user)
  return { data, meta: { total: data.length } }
})
