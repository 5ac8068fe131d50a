import { z } from 'zod'
import { PLAIN_TEXT, plainTextMessage } from './text'

const date = (f: string) => z.string({ error: `${f} is required (YYYY-MM-DD)` }).regex(/^\d{4}-\d{2}-\d{2}$/, `${f} must be YYYY-MM-DD`)
const minor = (f: string) => z.number({ error: `${f} must be a whole number of minor units` }).int(`${f} must be a whole number of minor units`).min(0, `${f} cannot be negative`).max(100_000_000)

export const CancellationTier = z.object({
  until: date('until'),
  refundPct: z.number({ error: 'refundPct must be 0–100' }).min(0, 'refundPct must be 0–100').max(100, 'refundPct must be 0–100'),
})
export type CancellationTierInput = z.infer<typeof CancellationTier>
/** As many tiers as an organiser's terms need, within reason (one a fortnight over most of a year). */
export const MAX_CANCELLATION_TIERS = 24

export const TripCreate = z.object({
  workspaceId: z.number({ error: 'workspaceId is required' }).int().positive(),
  primarySiteId: z.number({ error: 'primarySiteId is required' }).int().positive(),
  backupSiteIds: z.array(z.number().int().positive()).max(10).default([]),
  title: z.string({ error: 'title is required' }).trim().min(3, 'title is required').max(140).regex(PLAIN_TEXT, plainTextMessage('title')),
  description: z.string().max(5000).default(''),
  startDate: date('startDate'),
  endDate: date('endDate'),
  seats: z.number({ error: 'seats must be a whole number' }).int('seats must be a whole number').min(1, 'at least 1 seat').max(1000),
  priceMinor: minor('priceMinor'),
  depositMinor: minor('depositMinor'),
  currency: z.string({ error: 'currency is required' }).trim().toLowerCase().regex(/^[a-z]{3}$/, 'currency must be a 3-letter ISO 4217 code'),
  balanceDueDate: date('balanceDueDate'),
  cancellationTiers: z.array(CancellationTier).max(MAX_CANCELLATION_TIERS, `at most ${MAX_CANCELLATION_TIERS} cancellation tiers`).default([]),
  minGroupSize: z.number().int().min(1).max(1000).default(1),
  meetingPoint: z.object({
    name: z.string({ error: 'meeting point name is required' }).trim().min(1, 'meeting point name is required').max(200).regex(PLAIN_TEXT, plainTextMessage('meeting point name')),
    lat: z.number().min(-90, 'lat must be −90 to 90').max(90, 'lat must be −90 to 90'),
    lon: z.number().min(-180, 'lon must be −180 to 180').max(180, 'lon must be −180 to 180'),
    time: z.string({ error: 'meeting time is required' }).datetime({ offset: true, message: 'meeting time must be ISO 8601 with a UTC offset, e.g. 2027-08-02T06:30:00+03:00' }),
  }),
  guideIds: z.array(z.number().int().positive()).max(20).default([]),
}).superRefine((t, ctx) => {
  if (t.depositMinor > t.priceMinor) ctx.addIssue({ code: 'custom', path: ['depositMinor'], message: 'the deposit cannot exceed the price' })
  if (t.endDate < t.startDate) ctx.addIssue({ code: 'custom', path: ['endDate'], message: 'the trip cannot end before it starts' })
  if (t.minGroupSize > t.seats) ctx.addIssue({ code: 'custom', path: ['minGroupSize'], message: 'the minimum group cannot exceed the seats' })
  if (t.backupSiteIds.includes(t.primarySiteId)) ctx.addIssue({ code: 'custom', path: ['backupSiteIds'], message: 'a backup site cannot be the primary site' })
  for (let i = 1; i < t.cancellationTiers.length; i++) {
    if (t.cancellationTiers[i]!.until <= t.cancellationTiers[i - 1]!.until) ctx.addIssue({ code: 'custom', path: ['cancellationTiers', i, 'until'], message: 'tiers must be in date order' })
  }
})
export type TripCreateInput = z.infer<typeof TripCreate>

/** The most seats one hold (and one waitlist entry) may take. */
export const MAX_SEATS_PER_BOOKING = 20

export const BookingCreate = z.object({
  seats: z.number({ error: 'seats must be a whole number' }).int('seats must be a whole number').min(1, 'at least 1 seat').max(MAX_SEATS_PER_BOOKING, `at most ${MAX_SEATS_PER_BOOKING} seats per booking`),
})

/** The default "what to bring" list of a trip's briefing (common practice of eclipse guides). */
export const DEFAULT_CHECKLIST = [
  'Eclipse viewers (glasses or hand viewers) that meet ISO 12312-2, one per person and a spare',
  'A purpose-made solar filter for the front of every pair of binoculars, camera or telescope',
  'A red torch for the dark minutes and the walk back',
  'Water',
  'A hat and sun cream',
  'A folding chair or a mat',
]

export const ChecklistUpdate = z.object({
  items: z.array(z.string({ error: 'each item is text' }).trim().min(1, 'an item cannot be empty').max(160, 'at most 160 characters an item'), { error: 'items must be a list' })
    .min(1, 'keep at least one item').max(30, 'at most 30 items'),
})

export const BriefingQuery = z.object({ siteId: z.coerce.number({ error: 'siteId must be a site number' }).int('siteId must be a site number').positive('siteId must be a site number').optional() })

export const RefundCreate = z.object({
  amountMinor: z.number({ error: 'amountMinor must be a whole number' }).int().min(1, 'refund at least 1 minor unit'),
  reason: z.string({ error: 'a reason is required' }).trim().min(3, 'a reason is required').max(500),
})

/** Refund percentage in force on a date (YYYY-MM-DD): the first tier whose `until` is on or after it; 0 after the last. */
export function refundPctOn(tiers: CancellationTierInput[], today: string): number {
  const t = [...tiers].sort((a, b) => a.until.localeCompare(b.until)).find((x) => today <= x.until)
  return t ? t.refundPct : 0
}

/** "€2,490.00" from minor units. */
export function formatMoney(minor: number, currency: string): string {
  return new Intl.NumberFormat('en-GB', { style: 'currency', currency: currency.toUpperCase() }).format(minor / 100)
}

export type BookingStatus = 'held' | 'confirmed' | 'cancelled' | 'expired'
