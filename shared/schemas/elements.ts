import { z } from 'zod'

const num = (name: string) => z.number({ error: `${name} must be a number` }).finite(`${name} must be finite`)
const coeffs = (name: string, n: number, check?: (v: number[]) => string | null) =>
  z.array(num(name), { error: `${name} must be an array of ${n} numbers` })
    .length(n, `${name} needs exactly ${n} coefficients`)
    .superRefine((v, ctx) => { const m = check?.(v); if (m) ctx.addIssue({ code: 'custom', message: m }) })

/**
 * A published Besselian element set, as pasted or uploaded by an organiser. Arrays are
 * polynomial coefficients in t = TDT − t0 (hours). The plausibility bounds reject typing
 * slips (a coefficient in the wrong place) without second-guessing real sets.
 */
export const PublishedElements = z.object({
  date: z.string({ error: 'date is required (YYYY-MM-DD)' }).regex(/^\d{4}-\d{2}-\d{2}$/, 'date must be YYYY-MM-DD'),
  t0Tdt: num('t0 (TDT hour)').min(0, 't0 (TDT hour) must be 0–24 hours').max(24, 't0 (TDT hour) must be 0–24 hours'),
  deltaTSec: num('ΔT').min(-50, 'ΔT looks wrong (−50 to 10000 s)').max(10000, 'ΔT looks wrong (−50 to 10000 s)'),
  x: coeffs('x', 4, (v) => (Math.abs(v[0]!) > 2 ? 'x[0] must be within ±2 Earth radii' : Math.abs(v[1]!) > 1 ? 'x[1] (hourly rate) must be within ±1' : null)),
  y: coeffs('y', 4, (v) => (Math.abs(v[0]!) > 2 ? 'y[0] must be within ±2 Earth radii' : Math.abs(v[1]!) > 1 ? 'y[1] (hourly rate) must be within ±1' : null)),
  d: coeffs('d', 3, (v) => (Math.abs(v[0]!) > 24 ? 'd[0] must be a solar declination (±24°)' : null)),
  mu: coeffs('mu', 3, (v) => (v[0]! < 0 || v[0]! >= 360 ? 'mu[0] must be 0–360°' : Math.abs(v[1]! - 15) > 0.1 ? 'mu[1] must be about 15°/hour' : null)),
  l1: coeffs('l1', 3, (v) => (v[0]! < 0.4 || v[0]! > 0.7 ? 'l1[0] must be 0.4–0.7 Earth radii' : null)),
  l2: coeffs('l2', 3, (v) => (Math.abs(v[0]!) > 0.1 ? 'l2[0] must be within ±0.1 Earth radii' : null)),
  tanF1: num('tan f1').min(0.0045, 'tan f1 must be about 0.0046–0.0048').max(0.0049, 'tan f1 must be about 0.0046–0.0048'),
  tanF2: num('tan f2').min(0.0045, 'tan f2 must be about 0.0046–0.0048').max(0.0049, 'tan f2 must be about 0.0046–0.0048'),
  source: z.string({ error: 'source is required' }).trim().min(1, 'source is required').max(500),
})
export type PublishedElementsInput = z.infer<typeof PublishedElements>

export const EclipseIdParams = z.object({
  id: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'eclipse id must be a date, YYYY-MM-DD'),
})

const optionalNum = (min: number, max: number, name: string) =>
  z.coerce.number({ error: `${name} must be a number` }).min(min, `${name} must be ${min} to ${max}`).max(max, `${name} must be ${min} to ${max}`).optional()

export const LocalQuery = z.object({
  lat: z.coerce.number({ error: 'Latitude must be a number' }).min(-90, 'Latitude must be −90 to 90°').max(90, 'Latitude must be −90 to 90°'),
  lon: z.coerce.number({ error: 'Longitude must be a number' }).min(-180, 'Longitude must be −180 to 180°').max(180, 'Longitude must be −180 to 180°'),
  elev: optionalNum(-500, 9000, 'Height (m)'),
  deltaT: optionalNum(-50, 10000, 'ΔT (s)'),
})

/**
 * The path's sampling steps, seconds of UTC. A few fixed values, so that every path the public route
 * can compute is one of a small, known set (and the cache can hold them all).
 */
export const PATH_STEPS_SEC = ['30', '60', '120', '300', '600', '900'] as const

export const PathQuery = z.object({
  step: z.enum(PATH_STEPS_SEC, { error: `step must be one of ${PATH_STEPS_SEC.join(', ')} (seconds)` }).transform(Number).optional(),
  deltaT: optionalNum(-50, 10000, 'ΔT (s)'),
  wrap: z.enum(['split', 'unwrap']).optional(),
})

export const CatalogueQuery = z.object({
  from: z.coerce.number().int().min(1900, 'from must be 1900–2100').max(2100, 'from must be 1900–2100').optional(),
  to: z.coerce.number().int().min(1900, 'to must be 1900–2100').max(2100, 'to must be 1900–2100').optional(),
  type: z.enum(['total', 'annular', 'hybrid', 'partial']).optional(),
  upcoming: z.enum(['1', 'true']).optional(),
})

export const EclipseSettingsPatch = z.object({
  deltaTSec: z.number({ error: 'ΔT must be a number of seconds, or empty' }).min(-50, 'ΔT must be −50 to 10000 s').max(10000, 'ΔT must be −50 to 10000 s').nullable(),
})
