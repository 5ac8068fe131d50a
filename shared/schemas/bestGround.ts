import { z } from 'zod'

const lat = z.coerce.number({ error: 'lat must be a number' }).min(-90, 'lat must be −90 to 90').max(90, 'lat must be −90 to 90')
const lon = z.coerce.number({ error: 'lon must be a number' }).min(-180, 'lon must be −180 to 180').max(180, 'lon must be −180 to 180')

/** Where to search for the best ground, and how much of it to return. */
export const BestSpotsQuery = z.object({
  lat,
  lon,
  radiusKm: z.coerce.number({ error: 'radiusKm must be a number' }).min(5, 'radiusKm must be 5–500 km').max(500, 'radiusKm must be 5–500 km').default(100),
  limit: z.coerce.number({ error: 'limit must be a number' }).int('limit must be a whole number').min(1, 'limit must be 1–20').max(20, 'limit must be 1–20').default(5),
  minSunAltitudeDeg: z.coerce.number({ error: 'minSunAltitudeDeg must be a number' }).min(-1, 'minSunAltitudeDeg must be −1 to 60°').max(60, 'minSunAltitudeDeg must be −1 to 60°').default(0),
})
export type BestSpotsInput = z.infer<typeof BestSpotsQuery>

/** One point of the surface, for the map's hover read-out. */
export const SurfacePointQuery = z.object({ lat, lon })

/** Spots returned by the best-ground search are at least this far apart, km. */
export const BEST_SPOT_SEPARATION_KM = 5

/** The optional fields of a terrain upload. */
export const TerrainUploadFields = z.object({
  name: z.string({ error: 'name is required' }).trim().min(1, 'name is required').max(120, 'name must be at most 120 characters'),
})
