import { z } from 'zod'
import { formatMinor } from '../money/minorUnits'
import { PLAIN_TEXT, plainTextMessage } from './text'

/** `f`: the field in words ("the start date"). */
const date = (f: string) => z.string({ error: `Enter ${f} (YYYY-MM-DD)` }).regex(/^\d{4}-\d{2}-\d{2}$/, `${f.charAt(0).toUpperCase()}${f.slice(1)} must be a date, YYYY-MM-DD`)
const minor = (f: string) => z.number({ error: `${f} must be an amount in cents (whole minor units)` }).int(`${f} must be an amount in cents (whole minor units)`).min(0, `${f} cannot be negative`).max(100_000_000, `${f} is too large`)

export const CancellationTier = z.object({
  until: date('the tier\'s last day'),
  refundPct: z.number({ error: 'The refund must be 0–100 %' }).min(0, 'The refund must be 0–100 %').max(100, 'The refund must be 0–100 %'),
})
export type CancellationTierInput = z.infer<typeof CancellationTier>
/** As many tiers as an organiser's terms need, within reason (one a fortnight over most of a year). */
export const MAX_CANCELLATION_TIERS = 24

export const TripCreate = z.object({
  workspaceId: z.number({ error: 'Choose a planning workspace' }).int('Choose a planning workspace').positive('Choose a planning workspace'),
  primarySiteId: z.number({ error: 'Choose the primary site' }).int('Choose the primary site').positive('Choose the primary site'),
  backupSiteIds: z.array(z.number({ error: 'Choose backup sites from the list' }).int('Choose backup sites from the list').positive('Choose backup sites from the list'), { error: 'Choose backup sites from the list' }).max(10, 'At most 10 backup sites').default([]),
  title: z.string({ error: 'Give the trip a title' }).trim().min(3, 'Give the trip a title (3 characters or more)').max(140, 'The title is too long (at most 140 characters)').regex(PLAIN_TEXT, plainTextMessage('title')),
  description: z.string({ error: 'The description must be text' }).max(5000, 'The description is too long (at most 5,000 characters)').default(''),
  startDate: date('the start date'),
  endDate: date('the end date'),
  seats: z.number({ error: 'Give the number of seats' }).int('Seats must be a whole number').min(1, 'The trip needs at least one seat').max(1000, 'At most 1,000 seats'),
  priceMinor: minor('The price'),
  depositMinor: minor('The deposit'),
  currency: z.string({ error: 'Choose a currency' }).trim().toLowerCase().regex(/^[a-z]{3}$/, 'The currency must be a 3-letter ISO 4217 code'),
  balanceDueDate: date('the balance due date'),
  cancellationTiers: z.array(CancellationTier, { error: 'Cancellation tiers must be a list' }).max(MAX_CANCELLATION_TIERS, `At most ${MAX_CANCELLATION_TIERS} cancellation tiers`).default([]),
  minGroupSize: z.number({ error: 'The minimum group must be a number of people' }).int('The minimum group must be a whole number').min(1, 'The minimum group is at least one person').max(1000, 'The minimum group is at most 1,000').default(1),
  meetingPoint: z.object({
    name: z.string({ error: 'Name the meeting point' }).trim().min(1, 'Name the meeting point').max(200, 'The meeting point name is too long (at most 200 characters)').regex(PLAIN_TEXT, plainTextMessage('meeting point name')),
    lat: z.number({ error: 'The meeting point\'s latitude must be a number' }).min(-90, 'Latitude must be −90 to 90°').max(90, 'Latitude must be −90 to 90°'),
    lon: z.number({ error: 'The meeting point\'s longitude must be a number' }).min(-180, 'Longitude must be −180 to 180°').max(180, 'Longitude must be −180 to 180°'),
    time: z.string({ error: 'Enter the meeting time' }).datetime({ offset: true, message: 'The meeting time must be ISO 8601 with a UTC offset, e.g. 2027-08-02T06:30:00+03:00' }),
  }, { error: 'Give the meeting point' }),
  guideIds: z.array(z.number({ error: 'Choose guides from the list' }).int('Choose guides from the list').positive('Choose guides from the list'), { error: 'Choose guides from the list' }).max(20, 'At most 20 guides').default([]),
}).superRefine((t, ctx) => {
  if (t.depositMinor > t.priceMinor) ctx.addIssue({ code: 'custom', path: ['depositMinor'], message: 'The deposit cannot exceed the price' })
  if (t.endDate < t.startDate) ctx.addIssue({ code: 'custom', path: ['endDate'], message: 'The trip cannot end before it starts' })
  if (t.minGroupSize > t.seats) ctx.addIssue({ code: 'custom', path: ['minGroupSize'], message: 'The minimum group cannot exceed the seats' })
  if (t.backupSiteIds.includes(t.primarySiteId)) ctx.addIssue({ code: 'custom', path: ['backupSiteIds'], message: 'A backup site cannot be the primary site' })
  for (let i = 1; i < t.cancellationTiers.length; i++) {
    if (t.cancellationTiers[i]!.until <= t.cancellationTiers[i - 1]!.until) ctx.addIssue({ code: 'custom', path: ['cancellationTiers', i, 'until'], message: 'Cancellation tiers must be in date order' })
  }
})
export type TripCreateInput = z.infer<typeof TripCreate>

/** The most seats one hold (and one waitlist entry) may take. */
export const MAX_SEATS_PER_BOOKING = 20

export const BookingCreate = z.object({
  seats: z.number({ error: 'Choose at least one seat' }).int('Choose a whole number of seats').min(1, 'Choose at least one seat').max(MAX_SEATS_PER_BOOKING, `Choose at most ${MAX_SEATS_PER_BOOKING} seats per booking`),
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
  items: z.array(z.string({ error: 'Each checklist item is text' }).trim().min(1, 'A checklist item cannot be empty').max(160, 'A checklist item has at most 160 characters'), { error: 'The checklist must be a list' })
    .min(1, 'Keep at least one checklist item').max(30, 'At most 30 checklist items'),
})

export const BriefingQuery = z.object({ siteId: z.coerce.number({ error: 'Choose a site of this trip' }).int('Choose a site of this trip').positive('Choose a site of this trip').optional() })

export const RefundCreate = z.object({
  amountMinor: z.number({ error: 'The amount must be in cents (whole minor units)' }).int('The amount must be in cents (whole minor units)').min(1, 'Refund at least 1 cent (one minor unit)'),
  reason: z.string({ error: 'Give a reason' }).trim().min(3, 'Give a reason').max(500, 'The reason is too long (at most 500 characters)'),
})

/** Refund percentage in force on a date (YYYY-MM-DD): the first tier whose `until` is on or after it; 0 after the last. */
export function refundPctOn(tiers: CancellationTierInput[], today: string): number {
  const t = [...tiers].sort((a, b) => a.until.localeCompare(b.until)).find((x) => today <= x.until)
  return t ? t.refundPct : 0
}

/** "€2,490.00" from minor units, with the currency's own decimals ("¥120,000"). */
export function formatMoney(minor: number, currency: string): string {
  return formatMinor(minor, currency, 'en-GB')
}

export type BookingStatus = 'held' | 'confirmed' | 'cancelled' | 'expired'
