import { z } from 'zod'

const lat = z.coerce.number({ error: 'Latitude must be a number' }).min(-90, 'Latitude must be −90 to 90°').max(90, 'Latitude must be −90 to 90°')
const lon = z.coerce.number({ error: 'Longitude must be a number' }).min(-180, 'Longitude must be −180 to 180°').max(180, 'Longitude must be −180 to 180°')

/** Spots returned by the best-ground search are at least this far apart unless the request says otherwise, km. */
export const BEST_SPOT_SEPARATION_KM = 25

/**
 * Spots whose measure (expected seen seconds, or the central duration) lies within this many seconds
 * of each other count as equally good, and the one nearer the search centre ranks first: a few
 * seconds are not worth a longer drive (the contact uncertainty itself is ±1–2 s).
 */
export const BEST_SPOT_TIE_SEC = 3

/** Where to search for the best ground, and how much of it to return. */
export const BestSpotsQuery = z.object({
  lat,
  lon,
  radiusKm: z.coerce.number({ error: 'The search radius must be a number' }).min(5, 'The search radius must be 5–500 km').max(500, 'The search radius must be 5–500 km').default(100),
  limit: z.coerce.number({ error: 'The number of spots must be a number' }).int('The number of spots must be a whole number').min(1, 'Ask for 1 to 20 spots').max(20, 'Ask for 1 to 20 spots').default(5),
  minSunAltitudeDeg: z.coerce.number({ error: 'The lowest Sun altitude must be a number' }).min(-1, 'The lowest Sun altitude must be −1 to 60°').max(60, 'The lowest Sun altitude must be −1 to 60°').default(0),
  /** Spots are at least this far apart, km: distinct places, not five points on one hill. */
  minSeparationKm: z.coerce.number({ error: 'The distance between spots must be a number' }).min(1, 'The distance between spots must be 1–500 km').max(500, 'The distance between spots must be 1–500 km').default(BEST_SPOT_SEPARATION_KM),
})
export type BestSpotsInput = z.infer<typeof BestSpotsQuery>

/** One point of the surface, for the map's hover read-out. */
export const SurfacePointQuery = z.object({ lat, lon })

/** The optional fields of a terrain upload. */
export const TerrainUploadFields = z.object({
  name: z.string({ error: 'Give the model a name' }).trim().min(1, 'Give the model a name').max(120, 'The name is too long (at most 120 characters)'),
})
