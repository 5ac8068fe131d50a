import { z } from 'zod'
import { PLAIN_TEXT, plainTextMessage } from './text'

export const ROAD_ACCESS_VALUES = ['paved', 'gravel', 'track', 'none', 'unknown'] as const

const lat = z.number({ error: 'Latitude must be a number' }).min(-90, 'Latitude must be −90 to 90°').max(90, 'Latitude must be −90 to 90°')
const lon = z.number({ error: 'Longitude must be a number' }).min(-180, 'Longitude must be −180 to 180°').max(180, 'Longitude must be −180 to 180°')
const elevationM = z.number({ error: 'The height must be a number of metres' }).min(-500, 'The height must be −500 to 9000 m').max(9000, 'The height must be −500 to 9000 m')
const name = z.string({ error: 'Give the site a name' }).trim().min(1, 'Give the site a name').max(120, 'The name is too long (at most 120 characters)').regex(PLAIN_TEXT, plainTextMessage('name'))

export const SiteCreate = z.object({
  name,
  lat,
  lon,
  elevationM: elevationM.optional(),
  notes: z.string({ error: 'Notes must be text' }).max(2000, 'Notes are too long (at most 2,000 characters)').optional(),
  roadAccess: z.enum(ROAD_ACCESS_VALUES, { error: `Road access must be one of: ${ROAD_ACCESS_VALUES.join(', ')}` }).optional(),
  capacity: z.number({ error: 'Capacity must be a number of people' }).int('Capacity must be a whole number of people').min(0, 'Capacity cannot be negative').max(100000, 'Capacity must be at most 100,000 people').nullable().optional(),
  crossesBorder: z.boolean({ error: 'Say whether the trip crosses a border' }).optional(),
})
export type SiteCreateInput = z.infer<typeof SiteCreate>

export const SitePatch = SiteCreate.partial().extend({
  /** A height, or null to mark it "not set" again. */
  elevationM: elevationM.nullable().optional(),
  pinned: z.boolean({ error: 'Say whether the site is pinned' }).optional(),
  /** Manual cloud cover for this site, percent, or null to clear it; needs a source note. */
  cloudOverridePct: z.number({ error: 'The cloud override must be a percentage, or empty' }).min(0, 'The cloud override must be 0–100 %').max(100, 'The cloud override must be 0–100 %').nullable().optional(),
  cloudOverrideNote: z.string({ error: 'The override source must be text' }).trim().max(300, 'The override source is too long (at most 300 characters)').nullable().optional(),
}).refine((v) => v.cloudOverridePct === undefined || v.cloudOverridePct === null || !!v.cloudOverrideNote, {
  message: 'Say where the override comes from', path: ['cloudOverrideNote'],
})
export type SitePatchInput = z.infer<typeof SitePatch>

export const WorkspaceCreate = z.object({
  eclipseId: z.string({ error: 'Choose an eclipse' }).regex(/^\d{4}-\d{2}-\d{2}$/, 'The eclipse must be a date, YYYY-MM-DD'),
  name: z.string({ error: 'Give the workspace a name' }).trim().min(1, 'Give the workspace a name').max(120, 'The name is too long (at most 120 characters)').regex(PLAIN_TEXT, plainTextMessage('name')),
})

export const WorkspacePatch = z.object({
  name: z.string({ error: 'The name must be text' }).trim().min(1, 'Give the workspace a name').max(120, 'The name is too long (at most 120 characters)').regex(PLAIN_TEXT, plainTextMessage('name')).optional(),
  climatologyId: z.number({ error: 'Choose a climatology, or none' }).int('Choose a climatology, or none').positive('Choose a climatology, or none').nullable().optional(),
  /**
   * P(clear) weights of the scattered and broken sky categories, or null for the published ones.
   * Clear counts 1 and overcast 0, so 1 ≥ scattered ≥ broken ≥ 0.
   */
  cloudWeights: z.object({
    scattered: z.number({ error: 'The scattered-cloud weight must be a number' }).min(0, 'The scattered-cloud weight must be 0 to 1').max(1, 'The scattered-cloud weight must be 0 to 1'),
    broken: z.number({ error: 'The broken-cloud weight must be a number' }).min(0, 'The broken-cloud weight must be 0 to 1').max(1, 'The broken-cloud weight must be 0 to 1'),
  }, { error: 'Give both cloud weights, scattered and broken' }).refine((w) => w.broken <= w.scattered, { message: 'Broken cloud cannot weigh more than scattered cloud', path: ['broken'] }).nullable().optional(),
})

/**
 * One row of a site CSV (name, lat, lon, optional elevation and notes), as text from the file.
 * Numbers must be plain decimals: a CSV cell is not guessed at.
 */
const decimal = (field: string, min: number, max: number) => z.string().trim()
  .regex(/^[-+]?\d+(\.\d+)?$/, `${field} must be a decimal number`)
  .transform(Number)
  .refine((v) => v >= min && v <= max, `${field} must be ${min} to ${max}`)

export const SiteCsvRow = z.object({
  name,
  lat: decimal('Latitude', -90, 90),
  lon: decimal('Longitude', -180, 180),
  elevation: z.union([z.literal('').transform(() => undefined), decimal('Elevation', -500, 9000)]).optional(),
  notes: z.string().max(2000).optional(),
})

export interface CsvRowError { row: number; field: string; message: string }

/** Validates parsed CSV records (header row already used as keys). Row numbers count the header as row 1. */
export function validateSiteRows(records: Array<Record<string, string>>): { rows: SiteCreateInput[]; errors: CsvRowError[] } {
  const rows: SiteCreateInput[] = []
  const errors: CsvRowError[] = []
  records.forEach((rec, i) => {
    const normal: Record<string, string> = {}
    for (const [k, v] of Object.entries(rec)) normal[k.trim().toLowerCase().replace(/^elevation_m$|^elevationm$|^elev$/, 'elevation')] = v ?? ''
    const r = SiteCsvRow.safeParse(normal)
    if (!r.success) {
      for (const issue of r.error.issues) errors.push({ row: i + 2, field: String(issue.path[0] ?? 'row'), message: issue.message })
      return
    }
    rows.push({ name: r.data.name, lat: r.data.lat, lon: r.data.lon, elevationM: r.data.elevation, notes: r.data.notes })
  })
  if (records.length === 0) errors.push({ row: 1, field: 'file', message: 'The file has no site rows' })
  return { rows, errors }
}

export const REQUIRED_CSV_COLUMNS = ['name', 'lat', 'lon'] as const

/** Cloud figures for a site, from the workspace's climatology (filled in by the climatology service). */
export interface SiteCloud {
  cloudPct: number | null
  pClear: number | null
  pClearMethod: string | null
  cloudSource: string | null
  cloudNote: string
}
export const NO_CLIMATOLOGY: SiteCloud = { cloudPct: null, pClear: null, pClearMethod: null, cloudSource: null, cloudNote: 'no climatology loaded' }

export interface SiteMetrics extends SiteCloud {
  type: string
  centrelineDistanceKm: number | null
  halfWidthFraction: number | null
  limitDistanceKm: number | null
  durationSec: number
  magnitude: number
  c2Utc: string | null
  c2Local: string | null
  c2UncertaintySec: number | null
  zone: string
  utcOffset: string | null
  sunAltitudeDeg: number | null
  sunAzimuthDeg: number | null
  /** Sun below 15° at maximum: haze, obstacles and refraction make it a risk. */
  lowSun: boolean
  /** durationSec × pClear, or null without cloud data. */
  expectedSec: number | null
  /** The terrain horizon in the Sun's direction, or null when no uploaded terrain model covers the site. */
  horizon: SiteHorizonOut | null
}

/** The Sun against the terrain at one contact: apparent angles in degrees. */
export interface HorizonContactOut {
  sunAltitudeDeg: number
  terrainAltitudeDeg: number
  marginDeg: number
  /** The whole solar disc is above the terrain. */
  clear: boolean
  /** The Sun is within 2° of the terrain. */
  close: boolean
  azimuthDeg: number
  distanceKm: number
}

export interface SiteHorizonOut {
  c2: HorizonContactOut | null
  max: HorizonContactOut | null
  c3: HorizonContactOut | null
  /** The partial phase's first and last contacts, for the timetable's warnings. */
  c1: HorizonContactOut | null
  c4: HorizonContactOut | null
  /** Which model and which formulas. */
  source: string
  observerHeightM: number
  /** Whether the observer's height is the site's own or the model's ground plus eye height. */
  heightSource: 'site' | 'model'
  groundHeightM: number
  /** The terrain's apparent altitude by azimuth across the Sun's path in the sky. */
  profile: Array<{ azimuthDeg: number; altitudeDeg: number }>
  /** The Sun from C1 to C4, every 5 minutes and at the contacts. */
  sunTrack: Array<{ utc: string; altitudeDeg: number; azimuthDeg: number; label?: string }>
}

export interface SiteOut {
  id: number
  workspaceId: number
  name: string
  lat: number
  lon: number
  /** The site's height, m, or null when nobody set one (shown as "not set", never "0 m"). */
  elevationM: number | null
  /** Where the height came from: typed or imported ('given'), the workspace's terrain model ('terrain'), or null (not set). */
  elevationSource: 'given' | 'terrain' | null
  /** The height the contacts are computed for, m: the site's own, or sea level (0 m) while it is not set. */
  assumedElevationM: number
  /** The site still carries a name the planning page made up: rename it before publishing a trip that uses it. */
  nameAutomatic: boolean
  notes: string
  roadAccess: string
  capacity: number | null
  crossesBorder: boolean
  pinned: boolean
  cloudOverridePct: number | null
  cloudOverrideNote: string | null
  metrics: SiteMetrics
}

