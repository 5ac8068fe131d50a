import { TestClockBody } from '#shared/schemas/testClock'
import { advanceClock, testClockEnabled } from '../../services/clock'

/**
 * Moves this instance's clock forward, so tests see holds, offers and links lapse without sleeping.
 * Exists only with UMBRAFIELD_TEST_CLOCK=1 on a local app; otherwise it is an ordinary 404.
 */
export default defineEventHandler(async (event) => {
  if (!testClockEnabled()) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  const { advanceMs } = await readBodyAs(event, TestClockBody)
  return { nowIso: advanceClock(advanceMs) }
})
