/// <reference path="../types/astronomia.d.ts" />
import { Moon } from 'astronomia/elp'
import { Planet } from 'astronomia/planetposition'
import { apparentEquatorialVSOP87 } from 'astronomia/solar'
import { meanObliquity, nutation } from 'astronomia/nutation'
import { apparent as apparentSiderealSec } from 'astronomia/sidereal'
import elpMppDeFull from 'astronomia/data/elpMppDeFull'
import vsop87Dearth from 'astronomia/data/vsop87Dearth'
import { AU_KM, EARTH_EQUATORIAL_RADIUS_KM, SPEED_OF_LIGHT_KM_S } from '../../shared/eclipse/constants'

/**
 * Geocentric apparent Sun and Moon for Besselian elements, on the true equator and equinox
 * of date, in Earth equatorial radii. Series from the npm package astronomia (MIT):
 *
 * - Sun: full VSOP87 (series D, heliocentric ecliptic of date; Bretagnon & Francou 1988),
 *   turned geocentric, FK5-corrected, with IAU 1980 nutation and annual aberration
 *   (−20.4898″/R, which also carries the Sun's light time): Meeus, Astronomical Algorithms
 *   (2nd ed., 1998), ch. 25 "higher accuracy" — astronomia's `apparentEquatorialVSOP87`.
 * - Moon: ELP/MPP02 fitted to DE405/DE406 (Chapront & Francou 2003), the full series
 *   (`elpMppDeFull`), which astronomia returns on the inertial mean ecliptic and equinox of J2000.
 *   The frame steps below are ours.
 *
 * Both are then vectors on the same frame, so the element fit can subtract them.
 */

const ARCSEC = Math.PI / (180 * 3600)
/** J2000.0 as a Julian Day (TT). */
const J2000_JD = 2451545.0
/**
 * Obliquity of the inertial ecliptic of J2000 to the mean equator of J2000, radians:
 * 84381.406″ (IAU 2006, the value ELP/MPP02's inertial frame is tied to; Chapront & Francou 2003).
 * The older 84381.448″ differs by 0.04″, about 80 m at the Moon.
 */
const OBLIQUITY_J2000_RAD = 84381.406 * ARCSEC

type Vec = [number, number, number]
type Mat = [Vec, Vec, Vec]

const mul = (m: Mat, v: Vec): Vec => [
  m[0][0] * v[0] + m[0][1] * v[1] + m[0][2] * v[2],
  m[1][0] * v[0] + m[1][1] * v[1] + m[1][2] * v[2],
  m[2][0] * v[0] + m[2][1] * v[1] + m[2][2] * v[2],
]
const mm = (a: Mat, b: Mat): Mat => {
  const col = (j: 0 | 1 | 2): Vec => mul(a, [b[0][j], b[1][j], b[2][j]])
  const c0 = col(0), c1 = col(1), c2 = col(2)
  return [[c0[0], c1[0], c2[0]], [c0[1], c1[1], c2[1]], [c0[2], c1[2], c2[2]]]
}
/** Rotation of the frame (not the vector) about x, y or z by angle a: the usual R1, R2, R3. */
const R1 = (a: number): Mat => { const c = Math.cos(a), s = Math.sin(a); return [[1, 0, 0], [0, c, s], [0, -s, c]] }
const R2 = (a: number): Mat => { const c = Math.cos(a), s = Math.sin(a); return [[c, 0, -s], [0, 1, 0], [s, 0, c]] }
const R3 = (a: number): Mat => { const c = Math.cos(a), s = Math.sin(a); return [[c, s, 0], [-s, c, 0], [0, 0, 1]] }

/**
 * Mean equator and equinox of J2000 → true equator and equinox of date.
 * Precession: IAU 1976 (Lieske et al. 1977), angles ζ, z, θ of Meeus (21.2): P = R3(−z)·R2(θ)·R3(−ζ).
 * Nutation: IAU 1980, N = R1(−ε−Δε)·R3(−Δψ)·R1(ε) (Explanatory Supplement 1992, §3.222).
 * The same nutation is in the Sun (astronomia) and in the apparent sidereal time used for μ,
 * so the three stay consistent.
 */
export function j2000ToTrueOfDate(jde: number): Mat {
  const T = (jde - J2000_JD) / 36525
  const zeta = (2306.2181 * T + 0.30188 * T * T + 0.017998 * T ** 3) * ARCSEC
  const z = (2306.2181 * T + 1.09468 * T * T + 0.018203 * T ** 3) * ARCSEC
  const theta = (2004.3109 * T - 0.42665 * T * T - 0.041833 * T ** 3) * ARCSEC
  const P = mm(R3(-z), mm(R2(theta), R3(-zeta)))
  const [dPsi, dEps] = nutation(jde)
  const eps = meanObliquity(jde)
  const N = mm(R1(-(eps + dEps)), mm(R3(-dPsi), R1(eps)))
  return mm(N, P)
}

const ER_PER_AU = AU_KM / EARTH_EQUATORIAL_RADIUS_KM

let earth: Planet | undefined
let moon: Moon | undefined

/** Apparent geocentric Sun, true equator and equinox of date, Earth radii. */
export function apparentSun(jde: number): Vec {
  earth ??= new Planet(vsop87Dearth)
  const { ra, dec, range } = apparentEquatorialVSOP87(earth, jde)
  const r = range * ER_PER_AU
  return [r * Math.cos(dec) * Math.cos(ra), r * Math.cos(dec) * Math.sin(ra), r * Math.sin(dec)]
}

/** Geometric geocentric Moon from ELP/MPP02, inertial ecliptic and equinox of J2000, km. */
export function moonJ2000EclipticKm(jde: number): Vec {
  moon ??= new Moon(elpMppDeFull)
  const p = moon.positionXYZ(jde)
  return [p.x, p.y, p.z]
}

/**
 * Apparent geocentric Moon, true equator and equinox of date, Earth radii.
 *
 * Light time: the Moon is taken at t − τ, τ = r/c (about 1.3 s, 1.3 km of lunar motion).
 * For a body that moves with the Earth, annual aberration and the barycentric part of the
 * light-time correction cancel to first order (Explanatory Supplement 1992, §3.3), so the
 * geocentric position at t − τ is the apparent one. `distanceKm` is a known Earth–Moon
 * distance near t (it changes by under 1 km in 10 minutes, under 3 µs of light time);
 * without it the series is evaluated once more to find it.
 */
export function apparentMoon(jde: number, distanceKm?: number): { vec: Vec; distanceKm: number } {
  const r = distanceKm ?? Math.hypot(...moonJ2000EclipticKm(jde))
  const tauDays = r / SPEED_OF_LIGHT_KM_S / 86400
  const ecl = moonJ2000EclipticKm(jde - tauDays)
  // Inertial ecliptic of J2000 → mean equator of J2000: a rotation by −ε0 about x.
  const eqJ2000 = mul(R1(-OBLIQUITY_J2000_RAD), ecl)
  const v = mul(j2000ToTrueOfDate(jde), eqJ2000)
  const k = 1 / EARTH_EQUATORIAL_RADIUS_KM
  return { vec: [v[0] * k, v[1] * k, v[2] * k], distanceKm: Math.hypot(...ecl) }
}

/**
 * Greenwich apparent sidereal time, degrees, for a UT instant numerically equal to the TT
 * instant `jde`: μ in Besselian elements is referred to TDT, and ΔT enters only when the
 * shadow is placed on the rotating Earth. IAU 1982 mean sidereal time plus the equation of
 * the equinoxes (IAU 1980 nutation): Meeus (12.4), astronomia `sidereal.apparent`.
 */
export function gastDegAtTdt(jde: number): number {
  return (apparentSiderealSec(jde) / 86400) * 360
}
