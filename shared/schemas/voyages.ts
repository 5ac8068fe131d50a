import { z } from 'zod'
import { PLAIN_TEXT, plainTextMessage } from './text'

const lat = (words: string) => z.number({ error: `Give the ${words} latitude in degrees` }).min(-85, `The ${words} latitude must be −85° to 85°`).max(85, `The ${words} latitude must be −85° to 85°`)
const lon = (words: string) => z.number({ error: `Give the ${words} longitude in degrees` }).min(-180, `The ${words} longitude must be −180° to 180°`).max(180, `The ${words} longitude must be −180° to 180°`)

/** A voyage to intercept the central path at sea (speeds in knots, angles in degrees, times UTC ISO 8601). */
export const VoyageCreate = z.object({
  name: z.string({ error: 'name is required' }).trim().min(1, 'name is required').max(120, 'name is at most 120 characters').regex(PLAIN_TEXT, plainTextMessage('name')),
  departure: z.object({
    lat: lat('port'),
    lon: lon('port'),
    utc: z.string({ error: 'Give the time of leaving' }).datetime({ offset: true, message: 'Give the time of leaving as a date and time with its zone, e.g. 2027-08-01T18:00:00Z' }),
  }, { error: 'Give the port and the time of leaving' }),
  speedKn: z.number({ error: 'Give the speed in knots' }).gt(0, 'The speed must be more than 0 knots').max(45, 'The speed must be at most 45 knots'),
  minSunAltitudeDeg: z.number({ error: 'Give the lowest Sun in degrees' }).min(0, 'The lowest Sun must be 0° to 80°').max(80, 'The lowest Sun must be 0° to 80°').optional(),
  returnTo: z.object({ lat: lat('return port'), lon: lon('return port') }, { error: 'Give the return port' }).optional(),
  /** Keep moving through the eclipse at this heading (true, degrees) and speed. */
  holdCourse: z.object({
    headingDeg: z.number({ error: 'Give the heading in degrees' }).min(0, 'The heading must be 0° to 360°').max(360, 'The heading must be 0° to 360°'),
    speedKn: z.number({ error: 'Give the speed under way in knots' }).min(0, 'The speed under way must be 0 to 45 knots').max(45, 'The speed under way must be 0 to 45 knots'),
  }).optional(),
})
export type VoyageCreate = z.infer<typeof VoyageCreate>
