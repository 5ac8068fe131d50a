import { z } from 'zod'
import { PLAIN_TEXT, plainTextMessage } from './text'

const lat = (f: string) => z.number({ error: `${f}.lat must be a number` }).min(-85, `${f}.lat must be −85 to 85`).max(85, `${f}.lat must be −85 to 85`)
const lon = (f: string) => z.number({ error: `${f}.lon must be a number` }).min(-180, `${f}.lon must be −180 to 180`).max(180, `${f}.lon must be −180 to 180`)

/** A voyage to intercept the central path at sea (speeds in knots, angles in degrees, times UTC ISO 8601). */
export const VoyageCreate = z.object({
  name: z.string({ error: 'name is required' }).trim().min(1, 'name is required').max(120, 'name is at most 120 characters').regex(PLAIN_TEXT, plainTextMessage('name')),
  departure: z.object({
    lat: lat('departure'),
    lon: lon('departure'),
    utc: z.string({ error: 'departure.utc is required' }).datetime({ offset: true, message: 'departure.utc must be an ISO 8601 date and time with its zone, e.g. 2027-08-01T18:00:00Z' }),
  }, { error: 'departure {lat, lon, utc} is required' }),
  speedKn: z.number({ error: 'speedKn must be a number' }).gt(0, 'speedKn must be more than 0').max(45, 'speedKn must be at most 45 knots'),
  minSunAltitudeDeg: z.number({ error: 'minSunAltitudeDeg must be a number' }).min(0, 'minSunAltitudeDeg must be 0–80').max(80, 'minSunAltitudeDeg must be 0–80').optional(),
  returnTo: z.object({ lat: lat('returnTo'), lon: lon('returnTo') }).optional(),
  /** Keep moving through the eclipse at this heading (true, degrees) and speed. */
  holdCourse: z.object({
    headingDeg: z.number({ error: 'holdCourse.headingDeg must be a number' }).min(0, 'holdCourse.headingDeg must be 0–360').max(360, 'holdCourse.headingDeg must be 0–360'),
    speedKn: z.number({ error: 'holdCourse.speedKn must be a number' }).min(0, 'holdCourse.speedKn must be 0–45').max(45, 'holdCourse.speedKn must be 0–45'),
  }).optional(),
})
export type VoyageCreate = z.infer<typeof VoyageCreate>
