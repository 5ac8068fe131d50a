import { z } from 'zod'
import { PLAIN_TEXT, plainTextMessage } from './text'
import { CancellationTier, MAX_CANCELLATION_TIERS } from './trips'

const date = (f: string) => z.string({ error: `${f} must be YYYY-MM-DD` }).regex(/^\d{4}-\d{2}-\d{2}$/, `${f} must be YYYY-MM-DD`)
const minor = (f: string) => z.number({ error: `${f} must be a whole number of minor units` }).int(`${f} must be a whole number of minor units`).min(0, `${f} cannot be negative`).max(100_000_000)

/**
 * An organiser's edit of a trip: every field optional, absent ones unchanged. Rules that involve
 * the stored trip (deposit within the price, seats not below those taken, dates in order after the
 * merge) are checked by the service against the row, and answered as 400 naming the field.
 */
export const TripPatch = z.object({
  title: z.string().trim().min(3, 'title is required').max(140).regex(PLAIN_TEXT, plainTextMessage('title')).optional(),
  description: z.string().max(5000).optional(),
  startDate: date('startDate').optional(),
  endDate: date('endDate').optional(),
  priceMinor: minor('priceMinor').optional(),
  depositMinor: minor('depositMinor').optional(),
  seats: z.number({ error: 'seats must be a whole number' }).int('seats must be a whole number').min(1, 'at least 1 seat').max(1000).optional(),
  balanceDueDate: date('balanceDueDate').optional(),
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
  salesOpen: z.boolean({ error: 'salesOpen must be true or false' }).optional(),
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
  userIds: z.array(z.number({ error: 'userIds must be account numbers' }).int().positive(), { error: 'userIds must be a list' }).max(20, 'at most 20 guides a trip'),
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
