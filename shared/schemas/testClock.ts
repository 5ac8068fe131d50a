import { z } from 'zod'

/** Body of POST /_test/clock: how far to move the app's clock forward (tests only). */
export const TestClockBody = z.object({
  advanceMs: z.number().int().min(0).max(400 * 86_400_000),
})
