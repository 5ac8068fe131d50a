import type { ColumnType, Generated } from 'kysely'

export interface VoyagesTable {
  id: Generated<number>
  workspace_id: number
  name: string
  /** The request as sent (JSON). */
  request: string
  /** The computed plan (JSON). */
  plan: string
  created_by: number | null
  created_at: ColumnType<string, string | undefined, never>
}

export interface VoyageTables {
  voyages: VoyagesTable
}
