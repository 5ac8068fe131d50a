import { randomUUID } from 'node:crypto'
import type { Kysely } from 'kysely'
import type { Database } from '../database/schema'
import { nowDate } from './clock'

/** This process's name in the leases table. */
export const INSTANCE_ID = `${process.pid}-${randomUUID().slice(0, 8)}`

/**
 * Runs `job` only in the instance that holds the lease `name`, so a housekeeping tick happens once
 * across all app instances on one database. Taking the lease is one atomic statement on both
 * databases: insert it, or take it over when it has expired or is already ours (upsert with a
 * condition). A crashed holder's lease lapses after `ttlMs`. Returns whether the job ran.
 */
export async function withLease(db: Kysely<Database>, name: string, ttlMs: number, job: () => Promise<void>,
  opts: { renew?: boolean } = {}): Promise<boolean> {
  const now = nowDate()
  const expiresAt = new Date(now.getTime() + ttlMs).toISOString()
  // renew: false makes the lease a period ("once a day"): even its holder waits until it expires.
  const renew = opts.renew ?? true
  const taken = await db.insertInto('job_leases').values({ name, holder: INSTANCE_ID, expires_at: expiresAt })
    .onConflict((oc) => oc.column('name').doUpdateSet({ holder: INSTANCE_ID, expires_at: expiresAt })
      .where((eb) => renew
        ? eb.or([eb('job_leases.expires_at', '<=', now.toISOString()), eb('job_leases.holder', '=', INSTANCE_ID)])
        : eb('job_leases.expires_at', '<=', now.toISOString())))
    .returning('holder').executeTakeFirst()
  if (taken?.holder !== INSTANCE_ID) return false
  await job()
  return true
}
