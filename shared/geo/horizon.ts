/**
 * The terrain horizon seen from a point, from a height model. Pure; no I/O.
 *
 * For terrain of height h at distance d from an observer at height h0, on a sphere of radius R, the
 * geometric elevation angle is atan((h − h0) / d) − d / (2R): the second term is the drop of the
 * surface below the observer's tangent plane, d² / (2R), seen from d (small-angle sphere geometry,
 * as in geodesy texts, e.g. Bomford, Geodesy; from memory). Light from the terrain bends toward the
 * ground along the way, which raises it by k · d / (2R), with the standard coefficient of terrestrial
 * refraction k = 0.13 (Gauss's value, common surveying practice; from memory). So the apparent
 * angle is atan((h − h0) / d) − (1 − k) · d / (2R). The Sun's apparent altitude uses the
 * astronomical refraction of the eclipse engine (Sæmundsson, in besselian.ts), so both sides of the
 * comparison are apparent angles.
 */

/** IUGG mean Earth radius, m. */
export const EARTH_MEAN_RADIUS_M = 6_371_008.8
/** Standard coefficient of terrestrial refraction (Gauss; common surveying practice). */
export const TERRESTRIAL_REFRACTION_K = 0.13
/** The Sun's apparent semi-diameter, degrees (about 0.26–0.27°): the whole disc clears the terrain when its centre is this much above it. */
export const SUN_SEMIDIAMETER_DEG = 0.27
/** Within this many degrees of the terrain the timetable warns. */
export const TERRAIN_WARNING_DEG = 2
/** How far the horizon search looks, km. */
export const HORIZON_MAX_KM = 150

export interface HeightModel {
  /** Height above sea level in metres at a point, or null outside the model or where it has no data. */
  heightAt(lat: number, lon: number): number | null
  /** Cell size, km (the march's finest step is half of it). */
  cellKm: number
}

/** Destination on the sphere from (lat, lon) along an initial bearing, degrees. */
export function destination(latDeg: number, lonDeg: number, bearingDeg: number, distanceM: number): [number, number] {
  const rad = Math.PI / 180
  const lat = latDeg * rad, lon = lonDeg * rad, b = bearingDeg * rad, a = distanceM / EARTH_MEAN_RADIUS_M
  const lat2 = Math.asin(Math.sin(lat) * Math.cos(a) + Math.cos(lat) * Math.sin(a) * Math.cos(b))
  const lon2 = lon + Math.atan2(Math.sin(b) * Math.sin(a) * Math.cos(lat), Math.cos(a) - Math.sin(lat) * Math.sin(lat2))
  return [lat2 / rad, ((((lon2 / rad) + 540) % 360) - 180)]
}

/** The elevation angle of terrain h metres high at distance dM, seen from h0 metres, radians: geometric, or apparent with refraction k. */
export function terrainAngleRad(h: number, h0: number, dM: number, k = 0): number {
  return Math.atan((h - h0) / dM) - ((1 - k) * dM) / (2 * EARTH_MEAN_RADIUS_M)
}

export interface HorizonPoint {
  /** Apparent elevation angle of the highest terrain in this direction, degrees (with terrestrial refraction). */
  altitudeDeg: number
  /** The same without refraction, degrees. */
  geometricDeg: number
  /** Distance to the point that sets the horizon, km. */
  distanceKm: number
  heightM: number
}

/**
 * The terrain horizon in one direction: the largest apparent elevation angle along the great circle
 * from the observer, marched from half a cell out to HORIZON_MAX_KM or the edge of the model, in
 * steps of half a cell growing to 0.5 % of the distance. Null when the model has no terrain there.
 */
export function horizonAlong(model: HeightModel, lat: number, lon: number, observerHeightM: number, azimuthDeg: number, maxKm = HORIZON_MAX_KM): HorizonPoint | null {
  const minStep = Math.max(5, (model.cellKm * 1000) / 2)
  let best: HorizonPoint | null = null
  let bestRad = -Infinity
  for (let d = minStep; d <= maxKm * 1000; d += Math.max(minStep, d * 0.005)) {
    const [la, lo] = destination(lat, lon, azimuthDeg, d)
    const h = model.heightAt(la, lo)
    if (h === null) break
    const a = terrainAngleRad(h, observerHeightM, d, TERRESTRIAL_REFRACTION_K)
    if (a > bestRad) {
      bestRad = a
      best = { altitudeDeg: (a * 180) / Math.PI, geometricDeg: (terrainAngleRad(h, observerHeightM, d) * 180) / Math.PI, distanceKm: d / 1000, heightM: h }
    }
  }
  return best
}
