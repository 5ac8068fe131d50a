import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

/** Roles, from least to most privileged. Stored in users.role. */
export const ROLES = ['traveller', 'guide', 'organiser'] as const
export type Role = (typeof ROLES)[number]

export interface UsersTable {
  id: Generated<number>
  email: string
  name: string
  password_hash: string
  role: Role
  /** UTC ISO 8601. */
  created_at: ColumnType<string, string | undefined, never>
}

export interface AuditLogTable {
  id: Generated<number>
  /** UTC ISO 8601. */
  at: ColumnType<string, string | undefined, never>
  action: string
  actor_user_id: number | null
  subject_user_id: number | null
  ip: string | null
  /** JSON text. */
  detail: string | null
}

export interface SignInFailuresTable {
  id: Generated<number>
  email: string
  ip: string
  /** UTC ISO 8601. */
  at: string
}

export interface ElementSetsTable {
  id: Generated<number>
  eclipse_id: string
  /** The published element set, JSON text. */
  elements: string
  source: string
  created_by: number | null
  created_at: ColumnType<string, string | undefined, never>
}

export interface EclipseSettingsTable {
  eclipse_id: string
  /** ΔT override in seconds, or null for the model. */
  delta_t_sec: number | null
  updated_by: number | null
  updated_at: string
}

export interface WorkspacesTable {
  id: Generated<number>
  eclipse_id: string
  name: string
  created_by: number | null
  created_at: ColumnType<string, string | undefined, never>
  climatology_id: ColumnType<number | null, number | null | undefined, number | null>
}

export const ROAD_ACCESS = ['paved', 'gravel', 'track', 'none', 'unknown'] as const
export interface SitesTable {
  id: Generated<number>
  workspace_id: number
  name: string
  /** Geodetic latitude, degrees north. */
  lat: number
  /** Longitude, degrees east. */
  lon: number
  elevation_m: ColumnType<number, number | undefined, number>
  notes: ColumnType<string, string | undefined, string>
  road_access: ColumnType<(typeof ROAD_ACCESS)[number], (typeof ROAD_ACCESS)[number] | undefined, (typeof ROAD_ACCESS)[number]>
  capacity: number | null
  crosses_border: ColumnType<number, number | undefined, number>
  pinned: ColumnType<number, number | undefined, number>
  /** Manual cloud-cover override, percent, and its source note; wins over the climatology. */
  cloud_override_pct: ColumnType<number | null, number | null | undefined, number | null>
  cloud_override_note: ColumnType<string | null, string | null | undefined, string | null>
  created_at: ColumnType<string, string | undefined, never>
  updated_at: ColumnType<string, string | undefined, string>
}

export interface ClimatologyDatasetsTable {
  id: Generated<number>
  name: string
  source: string
  licence: ColumnType<string, string | undefined, string>
  years: ColumnType<string, string | undefined, string>
  time_of_day: ColumnType<string, string | undefined, string>
  demo: ColumnType<number, number | undefined, number>
  format: 'geotiff' | 'csv'
  lat0: number
  lon0: number
  dlat: number
  dlon: number
  nlat: number
  nlon: number
  has_categories: ColumnType<number, number | undefined, number>
  created_by: number | null
  created_at: ColumnType<string, string | undefined, never>
}

export interface ClimatologyGridsTable {
  dataset_id: number
  month: number
  cloud_pct: Buffer
  clear_pct: Buffer | null
  scattered_pct: Buffer | null
  broken_pct: Buffer | null
}

export interface Database {
  users: UsersTable
  audit_log: AuditLogTable
  sign_in_failures: SignInFailuresTable
  element_sets: ElementSetsTable
  eclipse_settings: EclipseSettingsTable
  workspaces: WorkspacesTable
  sites: SitesTable
  climatology_datasets: ClimatologyDatasetsTable
  climatology_grids: ClimatologyGridsTable
}

export type User = Selectable<UsersTable>
export type NewUser = Insertable<UsersTable>
export type UserUpdate = Updateable<UsersTable>
