import { z } from 'zod'
import { PLAIN_TEXT, plainTextMessage } from './text'

/** The day's decision: one of the trip's sites, when the group leaves, and where it meets. */
export const DecisionBody = z.object({
  siteId: z.coerce.number({ error: 'Choose one of the trip\'s sites' }).int('Choose one of the trip\'s sites').positive('Choose one of the trip\'s sites'),
  departAt: z.string({ error: 'Give the departure time' }).datetime({ offset: true, message: 'The departure time must be ISO 8601 with a UTC offset, e.g. 2027-08-02T05:30:00+02:00' }),
  meetingPoint: z.string().trim().max(200, 'At most 200 characters').regex(PLAIN_TEXT, plainTextMessage('meeting point')).nullish(),
  message: z.string().trim().max(600, 'At most 600 characters').nullish(),
})
export type DecisionInput = z.infer<typeof DecisionBody>

/** An acknowledgement link's token (base64url of 32 random bytes). */
export const AckParams = z.object({ token: z.string().regex(/^[A-Za-z0-9_-]{20,100}$/, 'Not a valid link') })

/** A browser's push subscription (PushSubscription.toJSON()). */
export const PushSubscriptionBody = z.object({
  endpoint: z.string({ error: 'endpoint is required' }).url('endpoint must be a URL').max(2000).refine((u) => /^https?:\/\//.test(u), 'endpoint must be an http(s) URL'),
  keys: z.object({
    p256dh: z.string({ error: 'keys.p256dh is required' }).regex(/^[A-Za-z0-9_-]{40,200}={0,2}$/, 'keys.p256dh must be base64url'),
    auth: z.string({ error: 'keys.auth is required' }).regex(/^[A-Za-z0-9_-]{10,100}={0,2}$/, 'keys.auth must be base64url'),
  }, { error: 'keys are required' }),
})
