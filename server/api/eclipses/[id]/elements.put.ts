import { EclipseIdParams, PublishedElements } from '#shared/schemas/elements'
import { importPublishedElements } from '../../../services/eclipses'

/** Organiser pastes or uploads a published element set; it wins over the computed one. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, EclipseIdParams)
  const body = await readBodyAs(event, PublishedElements)
  try {
    return await withServiceErrors(() => importPublishedElements(useDb(), user, id, body))
  } catch (e) {
    if (e instanceof Error && e.message.startsWith('These elements')) {
      throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: e.message, data: { fields: { date: e.message } } })
    }
    throw e
  }
})
