import { EclipseIdParams } from '#shared/schemas/elements'
import { eclipseDetail } from '../../../services/eclipses'

export default defineEventHandler(async (event) => {
  const { id } = paramsAs(event, EclipseIdParams)
  return withServiceErrors(() => eclipseDetail(useDb(), id))
})
