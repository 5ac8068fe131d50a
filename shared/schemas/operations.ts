import { z } from 'zod'
import { PLAIN_TEXT, plainTextMessage } from './text'

/**
 * A message body may span lines and hold tabs; other control characters, line/paragraph separators
 * and bidirectional overrides are refused (they can make the text read differently from what it is).
 */
const MESSAGE_BODY = /^[^\p{Cc}\p{Zl}\p{Zp}\u202A-\u202E\u2066-\u2069]*$/u
const bodyWithoutBreaks = (s: string) => s.replace(/[\r\n\t]/g, ' ')

/** POST /api/trips/{id}/messages (and its preview): plain text, escaped when put into HTML mail. */
export const TripMessageCreate = z.object({
  subject: z.string({ error: 'subject is required' }).trim().min(1, 'subject is required').max(150, 'subject is at most 150 characters').regex(PLAIN_TEXT, plainTextMessage('subject')),
  body: z.string({ error: 'body is required' }).trim().min(1, 'body is required').max(10_000, 'body is at most 10,000 characters')
    .refine((s) => MESSAGE_BODY.test(bodyWithoutBreaks(s)), 'body may not contain control characters other than line breaks and tabs'),
  to: z.enum(['confirmed', 'all'], { error: "to must be 'confirmed' or 'all'" }),
})
export type TripMessageInput = z.infer<typeof TripMessageCreate>

export const BOOKING_STATUSES = ['held', 'confirmed', 'cancelled', 'expired'] as const

/** GET /api/trips/{id}/bookings (and the CSV): every filter optional; an empty one is no filter. */
export const BookingSearch = z.object({
  q: z.string().trim().max(200, 'q is at most 200 characters').optional().transform((s) => s || undefined),
  status: z.union([z.literal(''), z.enum(BOOKING_STATUSES, { error: `status must be one of ${BOOKING_STATUSES.join(', ')}` })]).optional().transform((s) => s || undefined),
  owing: z.union([z.literal(''), z.enum(['true', 'false'], { error: "owing must be 'true' or 'false'" })]).optional().transform((s) => (s ? s === 'true' : undefined)),
})
export type BookingSearchInput = z.infer<typeof BookingSearch>

export const ALERT_MODES = ['immediate', 'digest'] as const
export const AlertPreference = z.object({ mode: z.enum(ALERT_MODES, { error: "mode must be 'immediate' or 'digest'" }) })

/** POST /api/alerts/read: some alerts by id, or all of the caller's. */
export const AlertsRead = z.union([
  z.object({ ids: z.array(z.number().int().positive()).min(1, 'ids needs at least one id').max(500) }),
  z.object({ all: z.literal(true) }),
], { error: 'send { ids: [...] } or { all: true }' })
