import { z } from 'zod'
import { PLAIN_TEXT, plainTextMessage } from './text'
import { CancellationTier, MAX_CANCELLATION_TIERS } from './trips'

const date = (words: string) => z.string({ error: `Give ${words} as a date (YYYY-MM-DD)` }).regex(/^\d{4}-\d{2}-\d{2}$/, `Give ${words} as a date (YYYY-MM-DD)`)
const minor = (words: string) => z.number({ error: `${words} must be an amount in cents (a whole number)` }).int(`${words} must be an amount in cents (a whole number)`).min(0, `${words} cannot be negative`).max(100_000_000, `${words} is too large`)

/**
 * An organiser's edit of a trip: every field optional, absent ones unchanged. Rules that involve
 * the stored trip (deposit within the price, seats not below those taken, dates in order after the
 * merge) are checked by the service against the row, and answered as 400 naming the field.
 */
export const TripPatch = z.object({
  title: z.string({ error: 'Give the trip a title' }).trim().min(3, 'Give the trip a title (3 characters or more)').max(140, 'The title is too long (at most 140 characters)').regex(PLAIN_TEXT, plainTextMessage('title')).optional(),
  description: z.string().max(5000).optional(),
  startDate: date('the start date').optional(),
  endDate: date('the end date').optional(),
  priceMinor: minor('The price').optional(),
  depositMinor: minor('The deposit').optional(),
  seats: z.number({ error: 'Give the number of seats' }).int('Seats must be a whole number').min(1, 'The trip needs at least one seat').max(1000, 'At most 1,000 seats').optional(),
  balanceDueDate: date('the balance due date').optional(),
  minGroupSize: z.number().int().min(1).max(1000).optional(),
  meetingPoint: z.object({
    name: z.string({ error: 'meeting point name is required' }).trim().min(1, 'meeting point name is required').max(200).regex(PLAIN_TEXT, plainTextMessage('meeting point name')),
    lat: z.number().min(-90, 'lat must be −90 to 90').max(90, 'lat must be −90 to 90'),
    lon: z.number().min(-180, 'lon must be −180 to 180').max(180, 'lon must be −180 to 180'),
    time: z.string({ error: 'meeting time is required' }).datetime({ offset: true, message: 'meeting time must be ISO 8601 with a UTC offset, e.g. 2027-08-02T06:30:00+03:00' }),
  }).optional(),
  cancellationTiers: z.array(CancellationTier).max(MAX_CANCELLATION_TIERS, `at most ${MAX_CANCELLATION_TIERS} cancellation tiers`).optional(),
  primarySiteId: z.number().int().positive().optional(),
  backupSiteIds: z.array(z.number().int().positive()).max(10).optional(),
  salesOpen: z.boolean({ error: 'Say whether sales are open (yes or no)' }).optional(),
}).strict().superRefine((t, ctx) => {
  const tiers = t.cancellationTiers ?? []
  for (let i = 1; i < tiers.length; i++) {
    if (tiers[i]!.until <= tiers[i - 1]!.until) ctx.addIssue({ code: 'custom', path: ['cancellationTiers', i, 'until'], message: 'tiers must be in date order' })
  }
  if (t.backupSiteIds && new Set(t.backupSiteIds).size !== t.backupSiteIds.length) ctx.addIssue({ code: 'custom', path: ['backupSiteIds'], message: 'a fallback site is listed twice' })
})
export type TripPatchInput = z.infer<typeof TripPatch>

/** The trip's guides, all at once: ids of guide (or organiser) accounts; an empty list removes every guide. */
export const TripGuidesPut = z.object({
  userIds: z.array(z.number({ error: 'Choose guides from the list' }).int('Choose guides from the list').positive('Choose guides from the list'), { error: 'Choose the guides as a list' }).max(20, 'At most 20 guides a trip'),
})

/** `?confirm=true` on a site change that touches trips with bookings, once the organiser has seen who it affects. */
export const ConfirmQuery = z.object({ confirm: z.enum(['true', '1', 'false', '0']).optional().transform((v) => v === 'true' || v === '1') })

/** Where each role starts after signing in (when no `next` was asked for). */
export function landingFor(role: string | undefined | null): string {
  if (role === 'organiser') return '/trips'
  if (role === 'guide') return '/guide/trips'
  if (role === 'traveller') return '/bookings'
  return '/'
}
