/**
 * A Besselian element set: polynomials in t = TDT − t0 (hours) that describe the Moon's
 * shadow on the fundamental plane (through the Earth's centre, perpendicular to the
 * Sun–Moon axis). Lengths are in Earth equatorial radii; angles in degrees.
 * Method: Explanatory Supplement to the Astronomical Almanac (1992), ch. 8;
 * Meeus, Elements of Solar Eclipses 1951–2200 (1989).
 */
export interface BesselianElements {
  /** Calendar date (TDT) on which t0 falls, YYYY-MM-DD. */
  date: string
  /** Reference instant t0, hours of TDT on `date` (0–24). */
  t0Tdt: number
  /** ΔT = TT − UT1 in seconds that the set is paired with by default. */
  deltaTSec: number
  /** x of the shadow axis: cubic coefficients [a0..a3], Earth radii, t in hours. */
  x: number[]
  /** y of the shadow axis: cubic coefficients, Earth radii. */
  y: number[]
  /** Declination d of the shadow axis: quadratic coefficients, degrees. */
  d: number[]
  /** Greenwich hour angle μ of the axis, referred to TDT: quadratic coefficients, degrees. */
  mu: number[]
  /** Radius of the penumbral cone on the fundamental plane: quadratic, Earth radii. */
  l1: number[]
  /** Radius of the umbral cone on the fundamental plane (negative for total): quadratic, Earth radii. */
  l2: number[]
  /** Tangent of the penumbral cone half-angle f1. */
  tanF1: number
  /** Tangent of the umbral cone half-angle f2. */
  tanF2: number
  /** Human-readable provenance of the set. */
  source: string
  /** Whether the set was computed by Umbrafield or imported from a publisher. */
  kind: 'computed' | 'published'
}

export type LocalEclipseType = 'total' | 'annular' | 'partial' | 'none'
export type GlobalEclipseType = 'total' | 'annular' | 'hybrid' | 'partial'

/** A geographic site. Latitude geodetic (WGS 84), degrees, north positive; longitude degrees, east positive. */
export interface Site {
  latDeg: number
  lonDeg: number
  /** Height above the ellipsoid (≈ above sea level), metres. */
  elevationM?: number
}

/** One catalogue row. Every value is computed from the eclipse's element set. */
export interface CatalogueRow {
  /** Date of greatest eclipse (UTC), YYYY-MM-DD. */
  id: string
  type: GlobalEclipseType
  greatest: { utc: string; lat: number; lon: number }
  gamma: number
  magnitude: number
  /** Central duration at greatest eclipse, s; null for non-central eclipses. */
  centralDurationSec: number | null
  /** Path width at greatest eclipse, km; null for non-central eclipses. */
  pathWidthKm: number | null
  sunAltitudeDeg: number
  deltaTSec: number
}
