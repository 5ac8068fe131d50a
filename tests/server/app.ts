import { randomUUID } from 'node:crypto'
import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { setup, url } from '@nuxt/test-utils/e2e'
import pg from 'pg'
import { beforeAll, inject } from 'vitest'
import { fakeServices } from '../../scripts/fakes.mjs'
import './global-setup'

const rootDir = resolve(__dirname, '../..')

/** The free ports the global set-up picked for this run (app and fakes). */
export const TEST_PORTS = inject('testPorts')
const TEST_APP_PORT = TEST_PORTS.app
const TEST_FAKE_PORTS = TEST_PORTS.fakes

/**
 * A fresh, empty PostgreSQL database on the throwaway cluster that scripts/with-postgres.mjs started
 * (UMBRAFIELD_TEST_PG_URL), or null when the suite runs on SQLite.
 */
export async function freshPostgresDatabase(): Promise<string | null> {
  const admin = process.env.UMBRAFIELD_TEST_PG_URL
  if (!admin) return null
  const name = `uf_${randomUUID().replace(/-/g, '').slice(0, 16)}`
  const c = new pg.Client(admin)
  await c.connect()
  try { await c.query(`create database ${name}`) } finally { await c.end() }
  const u = new URL(admin)
  u.pathname = `/${name}`
  return u.toString()
}

/**
 * The data key the test apps seal personal data with (32 bytes, base64; a production build refuses to
 * start without one unless it seeds the demo). Instances started beside the test app use it too.
 */
export const TEST_DATA_KEY = Buffer.alloc(32, 7).toString('base64')
export const TEST_DATA_KEY_ID = 'test1'

/** Which database the server tests run on, for test names and messages. */
export const TEST_DB = process.env.UMBRAFIELD_TEST_PG_URL ? 'PostgreSQL' : 'SQLite'

/**
 * Starts the built app for this test file on a fresh, demo-seeded database: a new SQLite file, or a
 * new PostgreSQL database when the suite runs under scripts/with-postgres.mjs.
 */
export async function useApp(env: Record<string, string> = {}) {
  const dir = mkdtempSync(join(tmpdir(), 'umbrafield-test-'))
  const databaseUrl = await freshPostgresDatabase()
  Object.assign(process.env, TEST_FAKE_PORTS)
  const fakeEnv = Object.assign({}, ...fakeServices({ appPort: TEST_APP_PORT }).map((f) => f.appEnv))
  await setup({
    rootDir,
    build: false,
    server: true,
    browser: false,
    port: TEST_APP_PORT,
    nuxtConfig: { nitro: { output: { dir: resolve(rootDir, '.output') } } },
    env: {
      NUXT_DB_PATH: join(dir, 'test.sqlite'),
      ...(databaseUrl ? { DATABASE_URL: databaseUrl } : {}),
      NUXT_SEED: 'demo',
      // The built app is a production build: demo seeding must be allowed explicitly.
      UMBRAFIELD_ALLOW_DEMO_SEED: '1',
      NUXT_SESSION_PASSWORD: 'test-session-password-that-is-long-enough-0123456789',
      NUXT_DATA_KEY: TEST_DATA_KEY,
      NUXT_DATA_KEY_ID: TEST_DATA_KEY_ID,
      NUXT_PUBLIC_APP_URL: `http://127.0.0.1:${TEST_APP_PORT}`,
      UMBRAFIELD_HOUSEKEEPING_MS: '1000',
      // Suites make many holds and sign-ups from one address; the limits themselves are tested in holds.spec.ts.
      UMBRAFIELD_HOLD_LIMIT: '1000',
      UMBRAFIELD_SIGNUP_LIMIT: '1000',
      UMBRAFIELD_WAITLIST_LIMIT: '1000',
      UMBRAFIELD_REFUND_RETRY_MS: '500',
      // Invitations and links arrive by e-mail: the worker looks at the outbox often.
      UMBRAFIELD_MAIL_POLL_MS: '400',
      // Tests move the app's clock (POST /_test/clock) rather than sleep until holds and offers lapse.
      UMBRAFIELD_TEST_CLOCK: '1',
      ...fakeEnv,
      ...env,
    },
  })
  // Wait until migrations, the catalogue and the basemap index are ready, so no test meets a warming server.
  beforeAll(async () => { await fetch(url('/api/health')) }, 120_000)
  /** The app's database, for tests that inspect rows directly (a SQLite path or a postgres:// URL). */
  return { dbTarget: databaseUrl ?? join(dir, 'test.sqlite') }
}

export interface ApiResult<T = any> { status: number; body: T; headers: Headers }

/** Base URL of the Stripe fake used by the server tests. */
export const STRIPE_FAKE = `http://127.0.0.1:${TEST_FAKE_PORTS.STRIPE_FAKE_PORT}`

export async function api<T = any>(path: string, opts: { method?: string; body?: unknown; cookie?: string; raw?: BodyInit; headers?: Record<string, string> } = {}): Promise<ApiResult<T>> {
  const headers: Record<string, string> = { ...(opts.headers ?? {}) }
  if (opts.cookie) headers.cookie = opts.cookie
  let body: BodyInit | undefined = opts.raw
  if (opts.body !== undefined) { headers['content-type'] = 'application/json'; body = JSON.stringify(opts.body) }
  const res = await fetch(url(path), { method: opts.method ?? 'GET', headers, body, redirect: 'manual' })
  const text = await res.text()
  let parsed: unknown = text
  try { parsed = JSON.parse(text) } catch { /* not JSON */ }
  return { status: res.status, body: parsed as T, headers: res.headers }
}

/**
 * Signs in and returns the session cookie header. `from` is the client address a trusted proxy
 * reports (the app must be started with NUXT_TRUSTED_PROXIES=127.0.0.1 for it to count).
 */
export async function signIn(email: string, password = 'eclipse-demo', from?: string): Promise<string> {
  const headers: Record<string, string> = { 'content-type': 'application/json' }
  if (from) headers['x-forwarded-for'] = from
  const res = await fetch(url('/api/auth/login'), { method: 'POST', headers, body: JSON.stringify({ email, password }) })
  if (res.status !== 200) throw new Error(`sign-in failed for ${email}: ${res.status}`)
  return res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ')
}

/**
 * Moves the app's clock forward by `ms` (the app under test only; each instance has its own clock).
 * Returns the app's new "now".
 */
export async function advanceClock(ms: number, base?: string): Promise<string> {
  const res = await fetch(base ? `${base}/_test/clock` : url('/_test/clock'), { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ advanceMs: Math.round(ms) }) })
  if (res.status !== 200) throw new Error(`the test clock did not move: ${res.status} ${await res.text()}`)
  return ((await res.json()) as { nowIso: string }).nowIso
}

export const ORGANISER = 'organiser@umbrafield.test'
export const GUIDE = 'guide@umbrafield.test'
export const TRAVELLER = 'traveller@umbrafield.test'
export const TRAVELLER2 = 'traveller2@umbrafield.test'

/** Polls `fn` until `ok` holds or `ms` pass; returns the last value (the caller asserts on it). */
export async function until<T>(fn: () => Promise<T>, ok: (v: T) => boolean, ms = 10_000): Promise<T> {
  const end = Date.now() + ms
  for (;;) {
    const v = await fn()
    if (ok(v) || Date.now() > end) return v
    await new Promise((r) => setTimeout(r, 150))
  }
}

/** The mail catcher's web side (maildev), where the app under test delivers its mail. */
export const MAIL_CATCHER = `http://127.0.0.1:${TEST_FAKE_PORTS.MAIL_FAKE_WEB_PORT}`

export interface CaughtMail { id: string; subject: string; text: string; html: string; to: Array<{ address: string }>; date: string }

/**
 * The newest mail to `to` whose subject matches, read from the mail catcher's REST API (waits for
 * the app's mail worker; throws when none comes). `ignore`: ids of mail already read; `containing`: text
 * the mail must hold (e.g. this app's own URL: every test file's app shares the one mail catcher).
 */
export async function caughtMail(to: string, subject: RegExp, opts: { ms?: number; ignore?: string[]; containing?: string } = {}): Promise<CaughtMail> {
  const end = Date.now() + (opts.ms ?? 45_000)
  for (;;) {
    const list = await caughtList()
    const hit = list.filter((m) => m.to.some((t) => t.address === to) && subject.test(m.subject) && !opts.ignore?.includes(m.id)
      && (opts.containing === undefined || m.text.includes(opts.containing))).at(-1)
    if (hit) return hit
    if (Date.now() > end) throw new Error(`no mail "${subject}" to ${to} reached the mail catcher`)
    await new Promise((r) => setTimeout(r, 200))
  }
}

/** The catcher's list, fetched at most every 250 ms however many callers wait on it at once. */
let lastList: { at: number; list: Promise<CaughtMail[]> } | null = null
function caughtList(): Promise<CaughtMail[]> {
  if (!lastList || Date.now() - lastList.at > 250) {
    lastList = { at: Date.now(), list: fetch(`${MAIL_CATCHER}/api/email`).then((r) => r.json() as Promise<CaughtMail[]>) }
  }
  return lastList.list
}

/** The token of the first `/path?token=` link in a mail's text. */
export function linkToken(mail: { text: string }, path = '/reset-password'): string {
  const m = new RegExp(`${path.replace(/[/]/g, '\\/')}\\?token=([A-Za-z0-9_-]+)`).exec(mail.text)
  if (!m) throw new Error(`no ${path} link in the mail`)
  return m[1]!
}

/**
 * An organiser invites someone, and the invitee chooses `password` through the link in the
 * invitation e-mail (as a person would). Returns the invite's answer.
 */
export async function inviteAndChoosePassword(orgCookie: string, body: { name: string; email: string; role: 'guide' | 'organiser' }, password = 'invited-password-0'): Promise<ApiResult> {
  const inv = await api('/api/users', { method: 'POST', body, cookie: orgCookie })
  if (inv.status !== 201) throw new Error(`invite failed for ${body.email}: ${inv.status}`)
  const mail = await caughtMail(body.email, /invited/)
  const set = await api('/api/auth/password-reset/confirm', { method: 'POST', body: { token: linkToken(mail), password } })
  if (set.status !== 200) throw new Error(`choosing a password failed for ${body.email}: ${set.status} ${JSON.stringify(set.body)}`)
  return inv
}
