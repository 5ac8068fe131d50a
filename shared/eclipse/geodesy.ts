import { DEG, EARTH_EQUATORIAL_RADIUS_KM, EARTH_FLATTENING, RAD } from './constants'

const a = EARTH_EQUATORIAL_RADIUS_KM
const f = EARTH_FLATTENING
const b = a * (1 - f)

/**
 * Geodesic distance (km) and initial bearing (degrees from north, clockwise) between two
 * points on the WGS 84 ellipsoid. Vincenty (1975), Survey Review 23(176), inverse formula.
 * Falls back to the spherical value for the rare nearly-antipodal non-convergence.
 */
export function inverse(lat1Deg: number, lon1Deg: number, lat2Deg: number, lon2Deg: number):
  { distanceKm: number; bearingDeg: number } {
  const L = (lon2Deg - lon1Deg) * DEG
  const U1 = Math.atan((1 - f) * Math.tan(lat1Deg * DEG))
  const U2 = Math.atan((1 - f) * Math.tan(lat2Deg * DEG))
  const sinU1 = Math.sin(U1), cosU1 = Math.cos(U1), sinU2 = Math.sin(U2), cosU2 = Math.cos(U2)
  let lambda = L
  let sinSigma = 0, cosSigma = 1, sigma = 0, cos2Alpha = 1, cos2SigmaM = 0, sinLambda = 0, cosLambda = 1
  for (let i = 0; i < 100; i++) {
    sinLambda = Math.sin(lambda)
    cosLambda = Math.cos(lambda)
    const t1 = cosU2 * sinLambda
    const t2 = cosU1 * sinU2 - sinU1 * cosU2 * cosLambda
    sinSigma = Math.sqrt(t1 * t1 + t2 * t2)
    if (sinSigma === 0) return { distanceKm: 0, bearingDeg: 0 }
    cosSigma = sinU1 * sinU2 + cosU1 * cosU2 * cosLambda
    sigma = Math.atan2(sinSigma, cosSigma)
    const sinAlpha = (cosU1 * cosU2 * sinLambda) / sinSigma
    cos2Alpha = 1 - sinAlpha * sinAlpha
    cos2SigmaM = cos2Alpha !== 0 ? cosSigma - (2 * sinU1 * sinU2) / cos2Alpha : 0
    const C = (f / 16) * cos2Alpha * (4 + f * (4 - 3 * cos2Alpha))
    const prev = lambda
    lambda = L + (1 - C) * f * sinAlpha *
      (sigma + C * sinSigma * (cos2SigmaM + C * cosSigma * (-1 + 2 * cos2SigmaM * cos2SigmaM)))
    if (Math.abs(lambda - prev) < 1e-12) break
  }
  const uSq = (cos2Alpha * (a * a - b * b)) / (b * b)
  const A = 1 + (uSq / 16384) * (4096 + uSq * (-768 + uSq * (320 - 175 * uSq)))
  const B = (uSq / 1024) * (256 + uSq * (-128 + uSq * (74 - 47 * uSq)))
  const dSigma = B * sinSigma * (cos2SigmaM + (B / 4) * (cosSigma * (-1 + 2 * cos2SigmaM * cos2SigmaM) -
    (B / 6) * cos2SigmaM * (-3 + 4 * sinSigma * sinSigma) * (-3 + 4 * cos2SigmaM * cos2SigmaM)))
  const distanceKm = b * A * (sigma - dSigma)
  const bearing = Math.atan2(cosU2 * sinLambda, cosU1 * sinU2 - sinU1 * cosU2 * cosLambda) * RAD
  return { distanceKm, bearingDeg: (bearing + 360) % 360 }
}

/**
 * Point reached from a start point along a geodesic with an initial bearing (degrees)
 * and a distance (km, may be negative to go the opposite way). Vincenty (1975), direct formula.
 */
export function direct(latDeg: number, lonDeg: number, bearingDeg: number, distanceKm: number):
  { latDeg: number; lonDeg: number } {
  if (distanceKm < 0) return direct(latDeg, lonDeg, bearingDeg + 180, -distanceKm)
  const alpha1 = bearingDeg * DEG
  const sinAlpha1 = Math.sin(alpha1), cosAlpha1 = Math.cos(alpha1)
  const tanU1 = (1 - f) * Math.tan(latDeg * DEG)
  const cosU1 = 1 / Math.sqrt(1 + tanU1 * tanU1), sinU1 = tanU1 * cosU1
  const sigma1 = Math.atan2(tanU1, cosAlpha1)
  const sinAlpha = cosU1 * sinAlpha1
  const cosSqAlpha = 1 - sinAlpha * sinAlpha
  const uSq = (cosSqAlpha * (a * a - b * b)) / (b * b)
  const A = 1 + (uSq / 16384) * (4096 + uSq * (-768 + uSq * (320 - 175 * uSq)))
  const B = (uSq / 1024) * (256 + uSq * (-128 + uSq * (74 - 47 * uSq)))
  let sigma = distanceKm / (b * A)
  let cos2SigmaM = 0, sinSigma = 0, cosSigma = 1
  for (let i = 0; i < 100; i++) {
    cos2SigmaM = Math.cos(2 * sigma1 + sigma)
    sinSigma = Math.sin(sigma)
    cosSigma = Math.cos(sigma)
    const dSigma = B * sinSigma * (cos2SigmaM + (B / 4) * (cosSigma * (-1 + 2 * cos2SigmaM * cos2SigmaM) -
      (B / 6) * cos2SigmaM * (-3 + 4 * sinSigma * sinSigma) * (-3 + 4 * cos2SigmaM * cos2SigmaM)))
    const prev = sigma
    sigma = distanceKm / (b * A) + dSigma
    if (Math.abs(sigma - prev) < 1e-12) break
  }
  const tmp = sinU1 * sinSigma - cosU1 * cosSigma * cosAlpha1
  const lat2 = Math.atan2(sinU1 * cosSigma + cosU1 * sinSigma * cosAlpha1, (1 - f) * Math.sqrt(sinAlpha * sinAlpha + tmp * tmp))
  const lambda = Math.atan2(sinSigma * sinAlpha1, cosU1 * cosSigma - sinU1 * sinSigma * cosAlpha1)
  const C = (f / 16) * cosSqAlpha * (4 + f * (4 - 3 * cosSqAlpha))
  const L = lambda - (1 - C) * f * sinAlpha * (sigma + C * sinSigma * (cos2SigmaM + C * cosSigma * (-1 + 2 * cos2SigmaM * cos2SigmaM)))
  let lon = lonDeg + L * RAD
  lon = ((lon + 180) % 360 + 360) % 360 - 180
  return { latDeg: lat2 * RAD, lonDeg: lon }
}

/** Earth-centred Cartesian coordinates (km) of a point on the ellipsoid surface. */
export function ecef(latDeg: number, lonDeg: number): [number, number, number] {
  const lat = latDeg * DEG, lon = lonDeg * DEG
  const e2 = f * (2 - f)
  const N = a / Math.sqrt(1 - e2 * Math.sin(lat) ** 2)
  return [N * Math.cos(lat) * Math.cos(lon), N * Math.cos(lat) * Math.sin(lon), N * (1 - e2) * Math.sin(lat)]
}
