// astronomia (MIT) ships no type declarations; these cover the parts Umbrafield uses.
declare module 'astronomia/elp' {
  /** ELP/MPP02 lunar theory. positionXYZ: geocentric km, inertial mean ecliptic and equinox of J2000. */
  export class Moon {
    constructor(data: object)
    positionXYZ(jde: number): { x: number; y: number; z: number }
  }
}
declare module 'astronomia/planetposition' {
  /** A VSOP87 planet: heliocentric ecliptic of date (series D). */
  export class Planet {
    constructor(data: object)
    position(jde: number): { lon: number; lat: number; range: number }
  }
}
declare module 'astronomia/solar' {
  import type { Planet } from 'astronomia/planetposition'
  /** Apparent Sun (FK5 correction, IAU 1980 nutation, aberration), true equator of date: radians, range in au. */
  export function apparentEquatorialVSOP87(earth: Planet, jde: number): { ra: number; dec: number; range: number }
}
declare module 'astronomia/nutation' {
  /** [Δψ, Δε] in radians, IAU 1980 theory (Meeus ch. 22). */
  export function nutation(jde: number): [number, number]
  /** Mean obliquity of the ecliptic, radians (IAU, Meeus 22.2). */
  export function meanObliquity(jde: number): number
}
declare module 'astronomia/sidereal' {
  /** Apparent sidereal time at Greenwich, seconds of time in [0, 86400). */
  export function apparent(jd: number): number
}
declare module 'astronomia/data/elpMppDeFull' { const data: object; export default data }
declare module 'astronomia/data/elpMppDe' { const data: object; export default data }
declare module 'astronomia/data/vsop87Dearth' { const data: object; export default data }
declare module 'astronomia/data/deltat' {
  const data: {
    historic: { table: number[]; first: number; last: number }
    data: { table: number[]; first: number; firstYM: [number, number]; last: number; lastYM: [number, number] }
    prediction: { table: number[]; first: number; last: number }
  }
  export default data
}
declare module 'astronomia/data/vsop87Dmercury' { const data: object; export default data }
declare module 'astronomia/data/vsop87Dvenus' { const data: object; export default data }
declare module 'astronomia/data/vsop87Dmars' { const data: object; export default data }
declare module 'astronomia/data/vsop87Djupiter' { const data: object; export default data }
declare module 'astronomia/data/vsop87Dsaturn' { const data: object; export default data }
declare module 'astronomia/coord' {
  /** Equatorial coordinates, radians. */
  export class Equatorial {
    constructor(ra?: number, dec?: number)
    ra: number
    dec: number
  }
}
declare module 'astronomia/elliptic' {
  import type { Planet } from 'astronomia/planetposition'
  import type { Equatorial } from 'astronomia/coord'
  /** Apparent geocentric right ascension and declination of a planet, equator and equinox of date (Meeus ch. 33). */
  export function position(planet: Planet, earth: Planet, jde: number): Equatorial
}
declare module 'astronomia/precess' {
  import type { Equatorial } from 'astronomia/coord'
  /** Precesses a position between epochs given in Julian years; proper motions in radians a year. */
  export function position(eq: Equatorial, epochFrom: number, epochTo: number, mα: number, mδ: number): Equatorial
}
declare module 'astronomia/illum' {
  /** Phase angle i (radians) from the Sun–planet r, Earth–planet Δ and Sun–Earth R distances (au). */
  export function phaseAngle(r: number, Δ: number, R: number): number
  /** Visual magnitudes, Astronomical Almanac 1984 formulas (Meeus ch. 41); i in radians. */
  export function mercury84(r: number, Δ: number, i: number): number
  export function venus84(r: number, Δ: number, i: number): number
  export function mars84(r: number, Δ: number, i: number): number
  export function jupiter84(r: number, Δ: number, i: number): number
  export function saturn84(r: number, Δ: number, B: number, ΔU: number): number
}
