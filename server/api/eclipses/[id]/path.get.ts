import { EclipseIdParams, PathQuery } from '#shared/schemas/elements'
import { eclipsePathFor } from '../../../services/eclipses'

export default defineEventHandler(async (event) => {
  const { id } = paramsAs(event, EclipseIdParams)
  const q = queryAs(event, PathQuery)
  setResponseHeader(event, 'Cache-Control', 'private, max-age=300')
  return withServiceErrors(() => eclipsePathFor(useDb(), id, q))
})
