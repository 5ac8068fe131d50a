import { position as planetRaDec } from 'astronomia/elliptic'
import * as illum from 'astronomia/illum'
import { Planet } from 'astronomia/planetposition'
import { position as precessPosition } from 'astronomia/precess'
import { apparent as apparentSiderealSec } from 'astronomia/sidereal'
import { Equatorial } from 'astronomia/coord'
import vsop87Dearth from 'astronomia/data/vsop87Dearth'
import vsop87Djupiter from 'astronomia/data/vsop87Djupiter'
import vsop87Dmars from 'astronomia/data/vsop87Dmars'
import vsop87Dmercury from 'astronomia/data/vsop87Dmercury'
import vsop87Dsaturn from 'astronomia/data/vsop87Dsaturn'
import vsop87Dvenus from 'astronomia/data/vsop87Dvenus'
import { refractionDeg } from '../../shared/eclipse/besselian'
import { deltaTAt } from '../../shared/eclipse/deltaT'

/**
 * Planets and bright stars in the sky at an instant and place, for the briefing's "what else you
 * will see" and the sky diagram. Independent of astronomy-engine (which the tests compare against):
 * - planets: full VSOP87 (series D, ecliptic and equinox of date) through astronomia's elliptic.position
 *   — light time, aberration, FK5 and nutation as in Meeus, Astronomical Algorithms ch. 33 — then
 *   apparent sidereal time (IAU 1982 with the equation of the equinoxes) for the hour angle;
 * - stars: J2000 catalogue places precessed to the date (Meeus ch. 21; proper motion and nutation
 *   ignored: well under 0.1° for these stars over a century);
 * - altitude with standard refraction (Sæmundsson, as for the Sun); no parallax (under 0.01° for planets).
 * Magnitudes: the Astronomical Almanac 1984 formulas as in Meeus ch. 41 (astronomia's illum *84), rounded to 0.1.
 */

const DEG = Math.PI / 180
let planets: Array<{ name: string; p: Planet; mag: (r: number, d: number, i: number) => number }> | undefined
let earth: Planet | undefined

function load() {
  earth ??= new Planet(vsop87Dearth)
  planets ??= [
    { name: 'Venus', p: new Planet(vsop87Dvenus), mag: illum.venus84 },
    { name: 'Jupiter', p: new Planet(vsop87Djupiter), mag: illum.jupiter84 },
    { name: 'Mercury', p: new Planet(vsop87Dmercury), mag: illum.mercury84 },
    { name: 'Mars', p: new Planet(vsop87Dmars), mag: illum.mars84 },
    // Saturn's ring tilt is left out of its magnitude (up to about 1 mag brighter with the rings open).
    { name: 'Saturn', p: new Planet(vsop87Dsaturn), mag: (r, d) => illum.saturn84(r, d, 0, 0) },
  ]
  return { earth, planets }
}

/**
 * Bright stars, J2000 right ascension (hours) and declination (degrees), V magnitude, from the Yale
 * Bright Star Catalogue as recalled from memory (positions to about 0.01°, ample for naming them in
 * the sky). The brightest fifteen that are seen in a total eclipse's sky when well placed.
 */
export const BRIGHT_STARS: ReadonlyArray<{ name: string; raH: number; decDeg: number; mag: number }> = [
  { name: 'Sirius', raH: 6.7525, decDeg: -16.7161, mag: -1.46 },
  { name: 'Canopus', raH: 6.3992, decDeg: -52.6957, mag: -0.74 },
  { name: 'Arcturus', raH: 14.2612, decDeg: 19.1825, mag: -0.05 },
  { name: 'Rigil Kentaurus', raH: 14.6600, decDeg: -60.8354, mag: -0.27 },
  { name: 'Vega', raH: 18.6156, decDeg: 38.7837, mag: 0.03 },
  { name: 'Capella', raH: 5.2782, decDeg: 45.9980, mag: 0.08 },
  { name: 'Rigel', raH: 5.2423, decDeg: -8.2016, mag: 0.13 },
  { name: 'Procyon', raH: 7.6550, decDeg: 5.2250, mag: 0.34 },
  { name: 'Achernar', raH: 1.6286, decDeg: -57.2368, mag: 0.46 },
  { name: 'Betelgeuse', raH: 5.9195, decDeg: 7.4071, mag: 0.5 },
  { name: 'Altair', raH: 19.8464, decDeg: 8.8683, mag: 0.77 },
  { name: 'Aldebaran', raH: 4.5987, decDeg: 16.5093, mag: 0.85 },
  { name: 'Antares', raH: 16.4901, decDeg: -26.4320, mag: 0.96 },
  { name: 'Spica', raH: 13.4199, decDeg: -11.1613, mag: 0.97 },
  { name: 'Pollux', raH: 7.7553, decDeg: 28.0262, mag: 1.14 },
  { name: 'Fomalhaut', raH: 22.9608, decDeg: -29.6222, mag: 1.16 },
  { name: 'Deneb', raH: 20.6905, decDeg: 45.2803, mag: 1.25 },
  { name: 'Regulus', raH: 10.1395, decDeg: 11.9672, mag: 1.35 },
]

export interface SkyObject { name: string; kind: 'planet' | 'star'; altitudeDeg: number; azimuthDeg: number; magnitude: number }

const jdOf = (utcMs: number) => utcMs / 86_400_000 + 2440587.5

function altAz(raRad: number, decRad: number, utcMs: number, latDeg: number, lonDeg: number) {
  const jdUt = jdOf(utcMs)
  const lst = (apparentSiderealSec(jdUt) / 240) * DEG + lonDeg * DEG
  const H = lst - raRad
  const φ = latDeg * DEG
  const sinAlt = Math.sin(φ) * Math.sin(decRad) + Math.cos(φ) * Math.cos(decRad) * Math.cos(H)
  const alt = Math.asin(Math.max(-1, Math.min(1, sinAlt))) / DEG
  const az = Math.atan2(-Math.cos(decRad) * Math.sin(H), Math.sin(decRad) * Math.cos(φ) - Math.cos(decRad) * Math.cos(H) * Math.sin(φ)) / DEG
  return { altitudeDeg: alt + refractionDeg(alt), azimuthDeg: ((az % 360) + 360) % 360 }
}

/** Every listed planet and bright star with its apparent altitude and azimuth (degrees), above the horizon or not. */
export function skyAt(utcMs: number, latDeg: number, lonDeg: number): SkyObject[] {
  const { earth, planets } = load()
  const jde = jdOf(utcMs) + deltaTAt(utcMs).deltaTSec / 86400
  const e = earth.position(jde)
  const out: SkyObject[] = []
  for (const pl of planets) {
    const eq = planetRaDec(pl.p, earth, jde)
    const hp = pl.p.position(jde)
    // Earth–planet distance from the heliocentric positions (AU).
    const x = hp.range * Math.cos(hp.lat) * Math.cos(hp.lon) - e.range * Math.cos(e.lat) * Math.cos(e.lon)
    const y = hp.range * Math.cos(hp.lat) * Math.sin(hp.lon) - e.range * Math.cos(e.lat) * Math.sin(e.lon)
    const z = hp.range * Math.sin(hp.lat) - e.range * Math.sin(e.lat)
    const Δ = Math.hypot(x, y, z)
    const i = illum.phaseAngle(hp.range, Δ, e.range)
    out.push({ name: pl.name, kind: 'planet', ...altAz(eq.ra, eq.dec, utcMs, latDeg, lonDeg), magnitude: Math.round(pl.mag(hp.range, Δ, i) * 10) / 10 })
  }
  // astronomia's precession takes epochs in Julian years.
  const epoch = 2000 + (jde - 2451545.0) / 365.25
  for (const s of BRIGHT_STARS) {
    const p = precessPosition(new Equatorial(s.raH * 15 * DEG, s.decDeg * DEG), 2000, epoch, 0, 0)
    out.push({ name: s.name, kind: 'star', ...altAz(p.ra, p.dec, utcMs, latDeg, lonDeg), magnitude: s.mag })
  }
  return out
}
