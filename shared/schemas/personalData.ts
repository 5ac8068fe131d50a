import { z } from 'zod'

/** Body of POST /api/me/erase: the account's password, and an explicit yes. */
export const EraseBody = z.object({
  password: z.string({ error: 'Enter your password' }).min(1, 'Enter your password').max(200),
  confirm: z.literal(true, { error: 'Tick the box to confirm that this cannot be undone' }),
})
export type EraseInput = z.infer<typeof EraseBody>
