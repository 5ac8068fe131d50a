import { execFile } from 'node:child_process'
import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import type { Kysely } from 'kysely'
import type { Transporter } from 'nodemailer'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { migrateToLatest, openDatabase } from '../../server/database/connection'
import type { Database } from '../../server/database/schema'
import { INSTANCE_ID, withLease } from '../../server/services/leases'
import { enqueueMail, processOutbox } from '../../server/services/outbox'
import { api, freshPostgresDatabase, TEST_DB, useApp } from './app'

// What several app instances on one database rely on, checked on the database this run uses
// (SQLite, or PostgreSQL under scripts/with-postgres.mjs). The app is started for the health check;
// the concurrency checks use a database of their own, opened twice as two instances would.
await useApp()
const rootDir = resolve(__dirname, '../..')

let target: string
let a: Kysely<Database>
let b: Kysely<Database>
beforeAll(async () => {
  target = (await freshPostgresDatabase()) ?? join(mkdtempSync(join(tmpdir(), 'uf-cluster-')), 'c.sqlite')
  a = openDatabase(target)
  await migrateToLatest(a)
  b = openDatabase(target)
})
afterAll(async () => { await a?.destroy(); await b?.destroy() })

describe(`several instances on one database (${TEST_DB})`, () => {
  it('the app runs on the database this run asked for', async () => {
    const h = await api('/api/health')
    expect(h.status).toBe(200)
    expect(h.body.database).toBe(TEST_DB === 'PostgreSQL' ? 'postgresql' : 'sqlite')
  })

  it('two instances migrating at once apply each migration once', async () => {
    const fresh = (await freshPostgresDatabase()) ?? join(mkdtempSync(join(tmpdir(), 'uf-mig-')), 'm.sqlite')
    // Two processes, as two instances starting together would be.
    const env = { ...process.env, ...(fresh.startsWith('postgres') ? { DATABASE_URL: fresh } : { NUXT_DB_PATH: fresh, DATABASE_URL: '' }) }
    const migrate = () => new Promise<{ code: number | null; out: string }>((done) => {
      execFile(process.execPath, ['--import', 'tsx', 'scripts/migrate.ts'], { env, cwd: rootDir }, (e, stdout, stderr) => done({ code: e ? (e.code as number) ?? 1 : 0, out: stdout + stderr }))
    })
    const [rx, ry] = await Promise.all([migrate(), migrate()])
    expect(rx.code, rx.out).toBe(0)
    expect(ry.code, ry.out).toBe(0)
    const x = openDatabase(fresh)
    try {
      const names = (await x.selectFrom('schema_migrations' as never).select('name' as never).execute()) as unknown as { name: string }[]
      expect(names.length).toBeGreaterThanOrEqual(10)
      expect(names.length).toBe(new Set(names.map((n) => n.name)).size)
      // Between them they applied every migration exactly once.
      const applied = [rx.out, ry.out].flatMap((o) => /migrated .*?: (\d{4}_[^\n]*)/.exec(o)?.[1]?.split(', ') ?? [])
      expect(applied.sort()).toEqual(names.map((n) => n.name).sort())
    } finally { await x.destroy() }
  })

  it('a job lease is held by one instance at a time and taken over once it lapses', async () => {
    await a.insertInto('job_leases').values({ name: 'nightly', holder: 'another-instance', expires_at: new Date(Date.now() + 60_000).toISOString() }).execute()
    let ran = 0
    expect(await withLease(b, 'nightly', 60_000, async () => { ran++ })).toBe(false)
    await a.updateTable('job_leases').set({ expires_at: new Date(Date.now() - 1000).toISOString() }).where('name', '=', 'nightly').execute()
    expect(await withLease(b, 'nightly', 60_000, async () => { ran++ })).toBe(true)
    const row = await a.selectFrom('job_leases').selectAll().where('name', '=', 'nightly').executeTakeFirstOrThrow()
    expect(row.holder).toBe(INSTANCE_ID)
    expect(ran).toBe(1)
    // Twenty ticks racing for a fresh lease: exactly one runs.
    const results = await Promise.all(Array.from({ length: 20 }, (_, i) => (i % 2 ? a : b).insertInto('job_leases')
      .values({ name: 'race', holder: `h${i}`, expires_at: new Date(Date.now() + 60_000).toISOString() })
      .onConflict((oc) => oc.column('name').doNothing()).executeTakeFirst()))
    expect(results.filter((r) => Number(r.numInsertedOrUpdatedRows) === 1)).toHaveLength(1)
  })

  it('two mail workers draining one outbox send every message exactly once', async () => {
    for (let i = 0; i < 40; i++) {
      await enqueueMail(a, { kind: 'cluster-test', to: { email: `p${i}@example.test` }, subject: `m${i}`, html: '<p>x</p>', text: 'x' })
    }
    const sent: string[] = []
    const transport = { sendMail: async (m: { messageId: string }) => { await new Promise((r) => setTimeout(r, 5)); sent.push(m.messageId) } } as unknown as Transporter
    for (let round = 0; round < 5; round++) {
      await Promise.all([processOutbox(a, transport, 'x@example.test', 15), processOutbox(b, transport, 'x@example.test', 15)])
    }
    expect(sent).toHaveLength(40)
    expect(new Set(sent).size).toBe(40)
    const left = await a.selectFrom('outbox').select('status').where('kind', '=', 'cluster-test').where('status', '!=', 'sent').execute()
    expect(left).toEqual([])
  })
})
