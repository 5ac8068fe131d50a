import { execFile, spawn, type ChildProcess } from 'node:child_process'
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
import { url } from '@nuxt/test-utils/e2e'
import { fakeServices } from '../../scripts/fakes.mjs'
import { freePort } from '../../scripts/free-port.mjs'
import { api, freshPostgresDatabase, inviteAndChoosePassword, ORGANISER, signIn, TEST_DATA_KEY, TEST_DATA_KEY_ID, TEST_DB, TEST_PORTS, useApp } from './app'

// What several app instances on one database rely on, checked on the database this run uses
// (SQLite, or PostgreSQL under scripts/with-postgres.mjs). The app is started for the health check
// and the seat race; the other concurrency checks use a database of their own, opened twice as two
// instances would. Racers sign in from their own addresses, as a trusted proxy reports them.
const { dbTarget } = await useApp({ NUXT_TRUSTED_PROXIES: '127.0.0.1' })
const rootDir = resolve(__dirname, '../..')

/**
 * Another instance of the built app on the test app's PostgreSQL database, on a free port, with the
 * same session secret (a cookie from one instance is good at the other, as behind a load balancer).
 */
async function startInstance(children: ChildProcess[]): Promise<string> {
  const port = await freePort()
  const base = `http://127.0.0.1:${port}`
  const child = spawn(process.execPath, ['.output/server/index.mjs'], {
    cwd: rootDir, stdio: 'ignore',
    env: {
      ...process.env, ...Object.assign({}, ...fakeServices({ appPort: TEST_PORTS.app }).map((f) => f.appEnv)),
      PORT: String(port), HOST: '127.0.0.1', DATABASE_URL: dbTarget, NUXT_DB_PATH: '',
      NUXT_SESSION_PASSWORD: 'test-session-password-that-is-long-enough-0123456789', // as tests/server/app.ts gives the test app
      NUXT_DATA_KEY: TEST_DATA_KEY, NUXT_DATA_KEY_ID: TEST_DATA_KEY_ID,
      NUXT_PUBLIC_APP_URL: base, NUXT_TRUSTED_PROXIES: '127.0.0.1', UMBRAFIELD_HOLD_LIMIT: '1000', UMBRAFIELD_TEST_CLOCK: '1',
    },
  })
  children.push(child)
  for (const end = Date.now() + 120_000; Date.now() < end;) {
    if (child.exitCode !== null) throw new Error(`the second instance exited with ${child.exitCode}`)
    try { if ((await fetch(`${base}/api/health`)).ok) return base } catch { /* starting */ }
    await new Promise((r) => setTimeout(r, 250))
  }
  throw new Error(`the instance on ${base} did not become healthy`)
}

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

  it('travellers racing for the last seats through two instances never oversell (one instance on SQLite)', async () => {
    // PostgreSQL: two more processes of the built app on the same database, the racers split between
    // them. SQLite is the one-process set-up: the same race against the one instance.
    const children: ChildProcess[] = []
    try {
      const bases = TEST_DB === 'PostgreSQL' ? await Promise.all([startInstance(children), startInstance(children)]) : [url('/').replace(/\/$/, '')]
      const org = await signIn(ORGANISER)
      const trip = await api('/api/trips', { method: 'POST', cookie: org, body: {
        workspaceId: 1, primarySiteId: 4, title: 'Last seats', startDate: '2027-07-31', endDate: '2027-08-03', seats: 10,
        priceMinor: 1000, depositMinor: 500, currency: 'eur', balanceDueDate: '2027-05-01', meetingPoint: { name: 'Hotel', lat: 25.69, lon: 32.64, time: '2027-08-02T03:30:00Z' },
      } })
      expect((await api(`/api/trips/${trip.body.id}/publish`, { method: 'POST', cookie: org })).status).toBe(200)
      const tripId = trip.body.id as number
      const racer = async (i: number) => {
        const email = `last-seat-${i}-${tripId}@umbrafield.test`
        await inviteAndChoosePassword(org, { name: `Last seat ${i}`, email, role: 'guide' }, `last-seat-${i}-password`)
        return signIn(email, `last-seat-${i}-password`, `198.51.100.${i + 1}`)
      }
      // Seven seats go first; twenty travellers then race for the last three, all at once.
      const early = await racer(0)
      expect((await fetch(`${bases[0]}/api/trips/${tripId}/bookings`, { method: 'POST', headers: { cookie: early, 'content-type': 'application/json' }, body: JSON.stringify({ seats: 7 }) })).status).toBe(201)
      const cookies = await Promise.all(Array.from({ length: 20 }, (_, i) => racer(i + 1)))
      const results = await Promise.all(cookies.map(async (cookie, i) => {
        const r = await fetch(`${bases[i % bases.length]}/api/trips/${tripId}/bookings`, { method: 'POST', headers: { cookie, 'content-type': 'application/json' }, body: JSON.stringify({ seats: 1 }) })
        return { status: r.status, body: await r.json() as { code?: string } }
      }))
      expect(results.filter((r) => r.status === 201)).toHaveLength(3)
      const refused = results.filter((r) => r.status !== 201)
      expect(refused).toHaveLength(17)
      for (const r of refused) expect([r.status, r.body.code]).toEqual([409, 'sold_out'])
      // Straight from the database: what is held on the trip is what it has, oversold by 0.
      const c = openDatabase(dbTarget)
      try {
        const held = await c.selectFrom('bookings').select('seats').where('trip_id', '=', tripId).where('status', '=', 'held').execute()
        const taken = held.reduce((s, b) => s + b.seats, 0)
        expect(Math.max(0, taken - 10)).toBe(0)
        expect(taken).toBe(10)
        expect(held).toHaveLength(4)
      } finally { await c.destroy() }
    } finally {
      for (const c of children) c.kill('SIGTERM')
    }
  }, 180_000)
})
