import { TestClockBody } from '#shared/schemas/testClock'
import { advanceClock, testClockEnabled } from '../../services/clock'

const LOOPBACK = new Set(['127.0.0.1', '::1', '::ffff:127.0.0.1'])

/**
 * Moves this instance's clock forward, so tests see holds, offers and links lapse without sleeping.
 * Exists only with UMBRAFIELD_TEST_CLOCK=1 on a local app, and answers only this machine (the
 * socket's own address, never a forwarded one) with a JSON body (a browser cannot send that
 * cross-site without a preflight this route never answers); otherwise it is an ordinary 404.
 */
export default defineEventHandler(async (event) => {
  const from = event.node.req.socket.remoteAddress ?? ''
  const json = (getRequestHeader(event, 'content-type') ?? '').toLowerCase().startsWith('application/json')
  if (!testClockEnabled() || !LOOPBACK.has(from) || !json) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  const { advanceMs } = await readBodyAs(event, TestClockBody)
  return { nowIso: advanceClock(advanceMs) }
})
