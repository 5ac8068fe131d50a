import { AckParams } from '#shared/schemas/decisions'
import { acknowledge } from '../../services/decisions'

/** The one button on the acknowledgement page: records that this person has seen the decision (once). */
export default defineEventHandler(async (event) => {
  const { token } = paramsAs(event, AckParams)
  setResponseHeaders(event, { 'Cache-Control': 'no-store' })
  return withDecisionErrors(() => acknowledge(useDb(), token, clientIp(event)))
})
