/** IUGG mean Earth radius, km. */
export const EARTH_MEAN_RADIUS_KM = 6371.0088

/** Great-circle distance on the mean sphere (haversine), km: ample for ranking and spacing; not a survey distance. */
export function haversineKm(lat1: number, lon1: number, lat2: number, lon2: number): number {
  const rad = Math.PI / 180
  const a = Math.sin(((lat2 - lat1) * rad) / 2) ** 2 + Math.cos(lat1 * rad) * Math.cos(lat2 * rad) * Math.sin(((lon2 - lon1) * rad) / 2) ** 2
  return 2 * EARTH_MEAN_RADIUS_KM * Math.asin(Math.min(1, Math.sqrt(a)))
}
