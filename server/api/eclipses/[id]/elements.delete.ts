import { EclipseIdParams } from '#shared/schemas/elements'
import { removePublishedElements } from '../../../services/eclipses'

export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, EclipseIdParams)
  await removePublishedElements(useDb(), user, id)
  return { ok: true }
})
