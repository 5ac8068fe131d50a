import { z } from 'zod'

/** Path of the outlook's per-site routes: the trip and one of its workspace's sites. */
export const OutlookSiteParams = z.object({
  id: z.coerce.number().int().positive(),
  siteId: z.coerce.number().int().positive(),
})

/**
 * Adds a site to a trip's outlook (when it is not already the primary or a fallback) and sets its
 * drive time from the meeting point: whole minutes, or null to use the estimate from the distance.
 */
export const OutlookSiteBody = z.object({
  driveMinutes: z.number({ error: 'Give the drive time in whole minutes, or leave it empty for the estimate' })
    .int('Give the drive time in whole minutes').min(0, 'The drive time cannot be negative').max(48 * 60, 'The drive time is at most two days (2,880 minutes)')
    .nullable().default(null),
})
export type OutlookSiteInput = z.infer<typeof OutlookSiteBody>
