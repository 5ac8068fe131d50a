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
 * condition). A crashed holder's lease lapses after `ttlMs`; a renewable lease is kept alive while
 * its job runs (see below). Returns whether the job ran.
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
  if (!renew) {
    await job()
    return true
  }
  // A long run (slow Stripe calls: each may take the SDK's timeout, times its retries) must not
  // outlive its lease, or a second instance would start the same work alongside. While the job runs
  // the lease is pushed forward every third of its TTL, so it lapses only when this process stops.
  const heartbeat = setInterval(() => {
    void db.updateTable('job_leases').set({ expires_at: new Date(nowDate().getTime() + ttlMs).toISOString() })
      .where('name', '=', name).where('holder', '=', INSTANCE_ID).execute().catch(() => { /* the next beat tries again */ })
  }, Math.max(50, Math.floor(ttlMs / 3)))
  heartbeat.unref()
  try {
    await job()
  } finally {
    clearInterval(heartbeat)
  }
  return true
}

/**
 * Wraps a periodic job so that runs never overlap in this process: a tick that comes while the
 * previous run is still going is skipped (returns false), not queued.
 */
export function singleFlight(job: () => Promise<void>): () => Promise<boolean> {
  let running = false
  return async () => {
    if (running) return false
    running = true
    try {
      await job()
      return true
    } finally {
      running = false
    }
  }
}
