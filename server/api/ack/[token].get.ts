import { AckParams } from '#shared/schemas/decisions'
import { ackView } from '../../services/decisions'

/** What an acknowledgement link shows, without signing in. Records nothing (mail scanners open links too). */
export default defineEventHandler(async (event) => {
  const { token } = paramsAs(event, AckParams)
  setResponseHeaders(event, { 'Cache-Control': 'no-store' })
  return withDecisionErrors(() => ackView(useDb(), token))
})
