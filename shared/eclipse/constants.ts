/**
 * Physical constants used by the eclipse engine. Each names its source.
 */

/** Earth equatorial radius, km. WGS 84. */
export const EARTH_EQUATORIAL_RADIUS_KM = 6378.137
/** Earth flattening, dimensionless. WGS 84. */
export const EARTH_FLATTENING = 1 / 298.257223563
/** Polar/equatorial axis ratio b/a, dimensionless. WGS 84. */
export const EARTH_AXIS_RATIO = 1 - EARTH_FLATTENING
/** First eccentricity squared, dimensionless. WGS 84. */
export const EARTH_E2 = EARTH_FLATTENING * (2 - EARTH_FLATTENING)

/** Lunar radius for the penumbra, in Earth equatorial radii. IAU 1982, as used by the Five Millennium Canon. */
export const K_PENUMBRA = 0.272488
/** Lunar radius for the umbra, in Earth equatorial radii (smaller, for the mean limb valleys). Five Millennium Canon. */
export const K_UMBRA = 0.272281

/** Solar radius at 1 au, arcseconds. IAU value used for eclipse work (959.63″ ≈ 696,000 km). */
export const SUN_RADIUS_ARCSEC_AT_1AU = 959.63
/** Astronomical unit, km. IAU 2012 Resolution B2. */
export const AU_KM = 149_597_870.7
/** Speed of light, km/s. SI definition. */
export const SPEED_OF_LIGHT_KM_S = 299_792.458

/**
 * Earth's rotation rate in degrees of hour angle per second of time, used to convert
 * ΔT into a shift of the local hour angle: 1.002738 × 15″/s = 0.00417807°/s.
 * Meeus, Elements of Solar Eclipses 1951–2200, ch. on local circumstances.
 */
export const HOUR_ANGLE_DEG_PER_SEC = 0.00417807

/** Julian Day of the Unix epoch 1970-01-01T00:00Z. */
export const JD_UNIX_EPOCH = 2440587.5

export const DEG = Math.PI / 180
export const RAD = 180 / Math.PI
