import type { Kysely, Selectable } from 'kysely'
import type { Database } from '../database/schema'
import { NO_CLIMATOLOGY, type CloudLookup } from './planning'

/** Cloud lookup for a workspace's sites from its chosen climatology dataset. */
export async function cloudLookupFor(_db: Kysely<Database>, _ws: Selectable<Database['workspaces']>): Promise<CloudLookup> {
  return () => NO_CLIMATOLOGY
}
