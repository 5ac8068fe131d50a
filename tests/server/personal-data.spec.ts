import { execFile } from 'node:child_process'
import { randomBytes } from 'node:crypto'
import { existsSync, readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { promisify } from 'node:util'
import { sql } from 'kysely'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/database/connection'
import { DEMO_TRIP_TITLE } from '../../server/database/seed/demo'
import { sealParticipantField, unsealParticipantField } from '../../server/services/people/participantSeal'
import { sealedKeyId } from '../../server/services/sealed'
import { SEALED_COLUMNS, SEALED_SETTINGS } from '../../server/services/personalData/sealedColumns'
import {
  advanceClock, api, inviteAndChoosePassword, ORGANISER, signIn, STRIPE_FAKE, TEST_DATA_KEY, TEST_DATA_KEY_ID, TEST_DB, TRAVELLER, TRAVELLER2, until, useApp,
} from './app'

// The key a rotation moves to. The app under test already knows it as a previous key, so it still
// reads everything after this file rotates its database.
const NEW_KEY = randomBytes(32).toString('base64')
const NEW_KEY_ID = 'test2'
// Participant details are purged this many days after a trip ends (the default is 90; a different
// number shows the setting is honoured).
const DAYS = 30
const { dbTarget } = await useApp({ NUXT_DATA_KEYS_PREVIOUS: `${NEW_KEY_ID}:${NEW_KEY}`, NUXT_PERSONAL_DATA_DAYS: String(DAYS) })
const db = openDatabase(dbTarget)
afterAll(() => db.destroy())

// This process seals test rows as the app would: the same key ring.
Object.assign(process.env, { NUXT_DATA_KEY: TEST_DATA_KEY, NUXT_DATA_KEY_ID: TEST_DATA_KEY_ID, NUXT_DATA_KEYS_PREVIOUS: `${NEW_KEY_ID}:${NEW_KEY}` })
delete process.env.NUXT_SESSION_PASSWORD

interface Details { fullName: string; passport: string; medical: string; phone: string; dob: string; dietary: string; emergencyPhone: string }
let seq = 0
/** Invented details, different for every participant (plain values to search for later). */
function details(tag: string): Details {
  const n = `${Date.now().toString(36)}${++seq}`
  return {
    fullName: `Zephyrine ${tag} Quillfeather ${n}`, passport: `PXQ${n.toUpperCase()}77`, medical: `Allergic to kumquats ${n}`,
    phone: `+4477009${String(100000 + seq).slice(-6)}`, dob: '1980-04-0' + ((seq % 9) + 1), dietary: `No quinoa ${n}`, emergencyPhone: `+3361234${String(1000 + seq).slice(-4)}`,
  }
}

async function addParticipant(bookingId: number, seat: number, d: Details) {
  // The demo seed gives some bookings invented participants: this test's own details replace them.
  await db.deleteFrom('participants').where('booking_id', '=', bookingId).where('seat', '=', seat).execute()
  await db.insertInto('participants').values({
    booking_id: bookingId, seat, full_name: d.fullName, nationality: 'GB', passport_expiry: '2031-01-31', emergency_name: `Contact of ${d.fullName}`, emergency_relation: 'sister',
    date_of_birth_sealed: sealParticipantField(bookingId, seat, 'dateOfBirth', d.dob),
    passport_number_sealed: sealParticipantField(bookingId, seat, 'passportNumber', d.passport),
    mobile_phone_sealed: sealParticipantField(bookingId, seat, 'mobilePhone', d.phone),
    dietary_sealed: sealParticipantField(bookingId, seat, 'dietary', d.dietary),
    medical_sealed: sealParticipantField(bookingId, seat, 'medical', d.medical),
    mobility_sealed: sealParticipantField(bookingId, seat, 'mobility', `Uses a cane ${d.passport}`),
    emergency_phone_sealed: sealParticipantField(bookingId, seat, 'emergencyPhone', d.emergencyPhone),
  }).execute()
}

/** A new traveller with a confirmed address, signed in. */
async function newTraveller(tag: string) {
  const email = `pd-${tag}-${Date.now().toString(36)}-${++seq}@umbrafield.test`.toLowerCase()
  const name = `Ottoline ${tag} Brackwater`
  const password = `pd-${tag}-password-0`
  expect((await api('/api/auth/register', { method: 'POST', body: { name, email, password } })).status).toBe(202)
  await db.updateTable('users').set({ email_confirmed_at: new Date().toISOString() }).where('email', '=', email).execute()
  const id = (await db.selectFrom('users').select('id').where('email', '=', email).executeTakeFirstOrThrow()).id
  return { id, email, name, password, cookie: await signIn(email, password) }
}

const fx = { org: '', luxorWs: 0, luxorSite: 0 }
async function publishedTrip(over: Record<string, unknown> = {}) {
  const t = await api('/api/trips', { method: 'POST', cookie: fx.org, body: {
    workspaceId: fx.luxorWs, primarySiteId: fx.luxorSite, title: `Personal data trip ${++seq}`, startDate: '2027-07-31', endDate: '2027-08-03',
    seats: 3, priceMinor: 100_000, depositMinor: 20_000, currency: 'eur', balanceDueDate: '2027-05-01', cancellationTiers: [{ until: '2099-01-01', refundPct: 100 }],
    minGroupSize: 1, meetingPoint: { name: 'Hotel (test)', lat: 25.69, lon: 32.64, time: '2027-08-02T06:30:00+03:00' }, ...over,
  } })
  expect(t.status, JSON.stringify(t.body)).toBe(201)
  expect((await api(`/api/trips/${t.body.id}/publish`, { method: 'POST', cookie: fx.org })).status).toBe(200)
  return t.body.id as number
}
async function hold(cookie: string, tripId: number, seats: number) {
  const r = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats }, cookie })
  expect(r.status, JSON.stringify(r.body)).toBe(201)
  return r.body.id as number
}
const fake = (path: string, body?: unknown) => fetch(`${STRIPE_FAKE}${path}`, body === undefined ? {} : { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) }).then((r) => r.json())

beforeAll(async () => {
  fx.org = await signIn(ORGANISER)
  const luxor = await db.selectFrom('trips').select(['workspace_id', 'primary_site_id']).where('title', '=', DEMO_TRIP_TITLE).executeTakeFirstOrThrow()
  fx.luxorWs = luxor.workspace_id
  fx.luxorSite = luxor.primary_site_id
}, 60_000)

/** Every value a participant row holds, sealed ones opened (the app's own key ring). */
async function participantsOf(bookingId: number) {
  const rows = await db.selectFrom('participants').selectAll().where('booking_id', '=', bookingId).orderBy('seat').execute()
  return rows.map((p) => ({ ...p, passport: unsealParticipantField(p.booking_id, p.seat, 'passportNumber', p.passport_number_sealed), medical: unsealParticipantField(p.booking_id, p.seat, 'medical', p.medical_sealed) }))
}

describe(`personal data (${TEST_DB})`, () => {
  const a = { cookie: '', bookingId: 0, d: [] as Details[] }
  const b = { email: '', name: '', bookingId: 0, d: {} as Details }

  it('GET /api/me/export gives the caller all of their own data and none of anyone else\'s', async () => {
    // A: the demo traveller with a confirmed, paid booking; two participants on it; a reset e-mail to them.
    a.cookie = await signIn(TRAVELLER2)
    const own = await api('/api/bookings', { cookie: a.cookie })
    a.bookingId = own.body.data.find((x: { status: string }) => x.status === 'confirmed').id
    a.d = [details('A1'), details('A2')]
    await addParticipant(a.bookingId, 1, a.d[0]!)
    await addParticipant(a.bookingId, 2, a.d[1]!)
    expect((await api('/api/auth/password-reset', { method: 'POST', body: { email: TRAVELLER2 } })).status).toBe(202)
    // B: someone else, with a hold and a participant of their own.
    const other = await newTraveller('B')
    Object.assign(b, { email: other.email, name: other.name })
    b.bookingId = await hold(other.cookie, await publishedTrip(), 1)
    b.d = details('B')
    await addParticipant(b.bookingId, 1, b.d)

    const r = await api('/api/me/export', { cookie: a.cookie })
    expect(r.status).toBe(200)
    expect(r.headers.get('content-disposition')).toMatch(/^attachment; filename="umbrafield-my-data-\d{4}-\d{2}-\d{2}\.json"$/)
    const x = r.body
    const me = await db.selectFrom('users').selectAll().where('email', '=', TRAVELLER2).executeTakeFirstOrThrow()
    expect(x.account).toMatchObject({ id: me.id, email: TRAVELLER2, name: me.name, role: 'traveller' })
    expect(x.bookings.map((k: { id: number }) => k.id)).toContain(a.bookingId)
    // The participants, sealed fields opened.
    const seats = x.participants.filter((p: { bookingId: number }) => p.bookingId === a.bookingId)
    expect(seats.map((p: { passportNumber: string }) => p.passportNumber)).toEqual([a.d[0]!.passport, a.d[1]!.passport])
    expect(seats[0]).toMatchObject({ fullName: a.d[0]!.fullName, medical: a.d[0]!.medical, mobilePhone: a.d[0]!.phone, dateOfBirth: a.d[0]!.dob, emergencyPhone: a.d[0]!.emergencyPhone })
    // Payments as the ledger holds them.
    const paid = await db.selectFrom('payments').select(['id', 'amount_minor']).where('booking_id', '=', a.bookingId).orderBy('id').execute()
    expect(paid.length).toBeGreaterThan(0)
    expect(x.payments.map((p: { id: number; amountMinor: number }) => [p.id, p.amountMinor])).toEqual(paid.map((p) => [p.id, p.amount_minor]))
    // The e-mails written to them (the reset link itself is never in it).
    expect(x.emails.some((m: { to: string; subject: string }) => m.to === TRAVELLER2 && /password/i.test(m.subject))).toBe(true)
    expect(JSON.stringify(x.emails)).not.toMatch(/token=[A-Za-z0-9_-]{16}/)
    // Nothing of B's.
    const text = JSON.stringify(x)
    for (const v of [b.email, b.name, b.d.fullName, b.d.passport, b.d.medical, b.d.phone]) expect(text).not.toContain(v)
    expect(x.bookings.map((k: { id: number }) => k.id)).not.toContain(b.bookingId)
    expect(x.participants.map((p: { bookingId: number }) => p.bookingId)).not.toContain(b.bookingId)
    expect(x.emails.every((m: { to: string }) => m.to === TRAVELLER2)).toBe(true)
    // Reading sealed details is logged like any other read.
    const log = await db.selectFrom('participant_access_log').selectAll().where('user_id', '=', me.id).where('via', '=', 'personal-data-export').execute()
    expect(log.length).toBeGreaterThan(0)
    // Signed out: no export.
    expect((await api('/api/me/export')).status).toBe(401)
  }, 60_000)

  it('never stores the sealed values in plain text: the raw database (SQLite file and WAL; PostgreSQL rows as text)', async () => {
    // A two-factor secret offered through the app is sealed too.
    const totp = await api('/api/me/totp', { method: 'POST', body: {}, cookie: a.cookie })
    expect(totp.status).toBe(200)
    const secrets = [totp.body.secret as string, ...[...a.d, b.d].flatMap((d) => [d.passport, d.medical, d.phone, d.dietary, d.emergencyPhone])]
    // In the clear by design, so a search that finds nothing is a search that could have found it.
    const clear = [a.d[0]!.fullName, b.d.fullName]
    let raw: string
    if (TEST_DB === 'SQLite') {
      const files = [dbTarget, `${dbTarget}-wal`].filter((f) => existsSync(f))
      expect(files).toContain(`${dbTarget}-wal`)
      raw = files.map((f) => readFileSync(f).toString('latin1')).join('\n')
    } else {
      const rows = await sql<{ t: string }>`select t::text as t from participants t union all select u::text from user_totp u union all select o::text from outbox o`.execute(db)
      raw = rows.rows.map((r) => r.t).join('\n')
    }
    for (const c of clear) expect(raw).toContain(c)
    for (const s of secrets) expect(raw, `found in plain text: ${s}`).not.toContain(s)
  })

  it('POST /api/me/erase with a wrong password is a 400 naming it, and changes nothing', async () => {
    const c = await newTraveller('C-wrong')
    const bookingId = await hold(c.cookie, await publishedTrip(), 1)
    const d = details('Cw')
    await addParticipant(bookingId, 1, d)
    const wrong = await api('/api/me/erase', { method: 'POST', body: { password: 'not-the-password', confirm: true }, cookie: c.cookie })
    expect(wrong.status).toBe(400)
    expect(wrong.body.data.fields.password).toMatch(/not right/)
    const unconfirmed = await api('/api/me/erase', { method: 'POST', body: { password: c.password }, cookie: c.cookie })
    expect(unconfirmed.status).toBe(400)
    expect(Object.keys(unconfirmed.body.data.fields)).toEqual(['confirm'])
    const u = await db.selectFrom('users').selectAll().where('id', '=', c.id).executeTakeFirstOrThrow()
    expect([u.email, u.name, u.erased_at]).toEqual([c.email, c.name, null])
    expect((await participantsOf(bookingId))[0]).toMatchObject({ full_name: d.fullName, passport: d.passport, erased_at: null })
    expect((await db.selectFrom('bookings').select('status').where('id', '=', bookingId).executeTakeFirstOrThrow()).status).toBe('held')
    expect((await api('/api/me', { cookie: c.cookie })).status).toBe(200)
    await signIn(c.email, c.password)
  }, 60_000)

  it('POST /api/me/erase anonymises the account, blanks participants, releases holds, keeps the ledger, ends sessions and audits without personal data', async () => {
    const c = await newTraveller('C')
    // A hold of two seats out of three, with two participants.
    const holdTrip = await publishedTrip()
    const heldId = await hold(c.cookie, holdTrip, 2)
    const dh = [details('Ch1'), details('Ch2')]
    await addParticipant(heldId, 1, dh[0]!)
    await addParticipant(heldId, 2, dh[1]!)
    expect((await api(`/api/trips/${holdTrip}`)).body.seatsLeft).toBe(1)
    // A paid booking, then cancelled and refunded: money that must stay on the ledger.
    const paidId = await hold(c.cookie, await publishedTrip(), 1)
    const dp = details('Cp')
    await addParticipant(paidId, 1, dp)
    const co = await api(`/api/bookings/${paidId}/checkout`, { method: 'POST', cookie: c.cookie })
    expect(co.status).toBe(200)
    await fake(`/_fake/checkout/sessions/${(co.body.url as string).split('/pay/')[1]}/complete`, { outcome: 'succeeded' })
    expect((await until(() => api(`/api/bookings/${paidId}`, { cookie: c.cookie }), (r) => r.body.status === 'confirmed')).body.status).toBe('confirmed')
    expect((await api(`/api/bookings/${paidId}/cancel`, { method: 'POST', body: {}, cookie: c.cookie })).status).toBe(200)
    const refunded = await until(() => db.selectFrom('refunds').select('status').where('booking_id', '=', paidId).execute(), (rs) => rs.length > 0 && rs.every((r) => r.status === 'succeeded'))
    expect(refunded.map((r) => r.status)).toEqual(['succeeded'])
    const ledger = async () => ({
      bookings: await db.selectFrom('bookings').select(['id', 'price_minor', 'deposit_minor', 'paid_minor', 'refunded_minor', 'currency']).where('user_id', '=', c.id).orderBy('id').execute(),
      payments: await db.selectFrom('payments').select(['id', 'amount_minor', 'currency', 'status', 'payment_intent_id']).where('booking_id', 'in', [heldId, paidId]).orderBy('id').execute(),
      refunds: await db.selectFrom('refunds').select(['id', 'amount_minor', 'status', 'stripe_refund_id']).where('booking_id', 'in', [heldId, paidId]).orderBy('id').execute(),
    })
    const before = await ledger()
    expect(before.payments.filter((p) => p.status === 'succeeded').map((p) => p.amount_minor)).toEqual([20_000])
    const second = await signIn(c.email, c.password)

    const r = await api('/api/me/erase', { method: 'POST', body: { password: c.password, confirm: true }, cookie: c.cookie })
    expect(r.status, JSON.stringify(r.body)).toBe(200)
    expect(r.body).toMatchObject({ erased: true, holdsReleased: 1, participantsBlanked: 3 })
    // Nothing left that names them (read before the failed sign-in below, which is a new event): e-mails scrubbed, the audit entry holds counts only.
    const mail = await db.selectFrom('outbox').select(['to_email', 'to_name', 'subject', 'text', 'html']).execute()
    const all = JSON.stringify(mail) + JSON.stringify(await db.selectFrom('audit_log').selectAll().execute())
    for (const v of [c.email, c.name, dh[0]!.fullName, dp.fullName]) {
      const i = all.indexOf(v)
      expect(i, `still there: ${all.slice(Math.max(0, i - 300), i + 100)}`).toBe(-1)
    }

    // Sign-in fails; both sessions have ended.
    expect((await api('/api/auth/login', { method: 'POST', body: { email: c.email, password: c.password } })).status).toBe(401)
    expect((await api('/api/me', { cookie: c.cookie })).status).toBe(401)
    expect((await api('/api/me', { cookie: second })).status).toBe(401)
    // The account keeps its row and nothing personal.
    const u = await db.selectFrom('users').selectAll().where('id', '=', c.id).executeTakeFirstOrThrow()
    expect(u.email).toBe(`erased-${c.id}@erased.invalid`)
    expect(u.name).toBe('Erased account')
    expect(u.erased_at).not.toBeNull()
    // Participants blanked, rows kept.
    for (const id of [heldId, paidId]) {
      for (const p of await db.selectFrom('participants').selectAll().where('booking_id', '=', id).execute()) {
        const { id: _i, booking_id: _b, seat: _s, updated_at: _u, erased_at, ...personal } = p
        expect(Object.values(personal).every((v) => v === null), JSON.stringify(personal)).toBe(true)
        expect(erased_at).not.toBeNull()
      }
    }
    // Even the details stored in the clear are gone from the raw file and its log (SQLite: zeroed and checkpointed).
    if (TEST_DB === 'SQLite') {
      const raw = [dbTarget, `${dbTarget}-wal`].filter((f) => existsSync(f)).map((f) => readFileSync(f).toString('latin1')).join('\n')
      for (const v of [dh[0]!.fullName, dh[1]!.fullName, dp.fullName, c.name]) expect(raw, `still in the file: ${v}`).not.toContain(v)
      // …while another traveller's name, never erased, is still there to be found.
      expect(raw).toContain(a.d[0]!.fullName)
    }
    // The held seats are back on sale; the ledger is unchanged.
    expect((await db.selectFrom('bookings').select('status').where('id', '=', heldId).executeTakeFirstOrThrow()).status).toBe('cancelled')
    expect((await api(`/api/trips/${holdTrip}`)).body.seatsLeft).toBe(3)
    expect(await ledger()).toEqual(before)
    const entry = await db.selectFrom('audit_log').selectAll().where('action', '=', 'account_erased').where('subject_user_id', '=', c.id).executeTakeFirstOrThrow()
    expect(entry.ip).toBeNull()
    expect(JSON.parse(entry.detail!)).toMatchObject({ formerRole: 'traveller', holdsReleased: 1, participantsBlanked: 3 })
  }, 120_000)

  it('refuses to erase a confirmed booking on a trip not yet over (409), and the last organiser (409); another organiser may', async () => {
    const t2 = await signIn(TRAVELLER2)
    const active = await api('/api/me/erase', { method: 'POST', body: { password: 'eclipse-demo', confirm: true }, cookie: t2 })
    expect(active.status).toBe(409)
    expect(active.body.data).toMatchObject({ code: 'booking_active', bookingIds: [a.bookingId] })
    expect((await participantsOf(a.bookingId)).map((p) => p.passport)).toEqual([a.d[0]!.passport, a.d[1]!.passport])
    await signIn(TRAVELLER2)

    const organisers = await db.selectFrom('users').select('email').where('role', '=', 'organiser').execute()
    expect(organisers.map((o) => o.email)).toEqual([ORGANISER])
    const last = await api('/api/me/erase', { method: 'POST', body: { password: 'eclipse-demo', confirm: true }, cookie: fx.org })
    expect(last.status).toBe(409)
    expect(last.body.data.code).toBe('last_organiser')
    expect((await api('/api/me', { cookie: fx.org })).status).toBe(200)

    const email = `pd-second-organiser-${Date.now().toString(36)}@umbrafield.test`
    await inviteAndChoosePassword(fx.org, { name: 'Second Organiser (test)', email, role: 'organiser' }, 'second-organiser-pw')
    const second = await signIn(email, 'second-organiser-pw')
    const ok = await api('/api/me/erase', { method: 'POST', body: { password: 'second-organiser-pw', confirm: true }, cookie: second })
    expect(ok.status, JSON.stringify(ok.body)).toBe(200)
    // Now the first is the last again.
    expect((await api('/api/me/erase', { method: 'POST', body: { password: 'eclipse-demo', confirm: true }, cookie: fx.org })).body.data.code).toBe('last_organiser')
  }, 60_000)

  it('npm run keys:rotate re-seals every sealed column under the new key; without the old key everything still opens', async () => {
    const columns = SEALED_COLUMNS.map((c) => ({ ...c }))
    const sealedValues = async () => {
      const out: Array<{ where: string; value: string }> = []
      for (const c of columns) {
        const rows = await (db as any).selectFrom(c.table).select([c.column, c.key]).where(c.column, 'is not', null).orderBy(c.key).execute()
        for (const r of rows) out.push({ where: `${c.table}.${c.column}#${r[c.key]}`, value: r[c.column] })
      }
      // Sealed values inside app settings (the web-push key, once made).
      for (const st of SEALED_SETTINGS) {
        const row = await db.selectFrom('app_settings').select('value').where('key', '=', st.key).executeTakeFirst()
        const v = row ? (JSON.parse(row.value) as Record<string, unknown>)[st.field] : undefined
        if (typeof v === 'string') out.push({ where: `app_settings.${st.key}`, value: v })
      }
      return out
    }
    const before = await sealedValues()
    // Participants, a pending two-factor secret and a queued link at least.
    const tables = new Set(before.map((v) => v.where.split('.')[0]))
    expect(tables.has('participants') && tables.has('user_totp')).toBe(true)
    expect(before.every((v) => sealedKeyId(v.value) === TEST_DATA_KEY_ID)).toBe(true)

    // Asynchronously: a blocked event loop would leave the test's kept-alive HTTP connections to the app stale.
    const run = async (env: Record<string, string>, args: string[] = []) => {
      const full: Record<string, string> = { ...process.env as Record<string, string>, ...env }
      delete full.NUXT_SESSION_PASSWORD
      if (TEST_DB === 'SQLite') { full.NUXT_DB_PATH = dbTarget; delete full.DATABASE_URL } else full.DATABASE_URL = dbTarget
      const r = await promisify(execFile)('npx', ['tsx', 'scripts/keys-rotate.ts', ...args], { cwd: resolve(__dirname, '../..'), env: full, encoding: 'utf8', timeout: 60_000 })
        .then((o) => ({ ...o, code: 0 }), (e: { code: number; stdout: string; stderr: string }) => e)
      const last = r.stdout.trim().split('\n').at(-1) ?? ''
      return { status: r.code, out: r.stdout + r.stderr, totals: last.startsWith('{') ? JSON.parse(last) : null }
    }
    const rotated = await run({ NUXT_DATA_KEY: NEW_KEY, NUXT_DATA_KEY_ID: NEW_KEY_ID, NUXT_DATA_KEYS_PREVIOUS: `${TEST_DATA_KEY_ID}:${TEST_DATA_KEY}` })
    expect(rotated.status, rotated.out).toBe(0)
    expect(rotated.totals).toMatchObject({ currentKeyId: NEW_KEY_ID, failed: 0, alreadyCurrent: 0 })
    expect(rotated.totals.rotated).toBeGreaterThanOrEqual(before.length)
    const after = await sealedValues()
    expect(after.map((v) => v.where)).toEqual(before.map((v) => v.where))
    expect(after.filter((v) => sealedKeyId(v.value) !== NEW_KEY_ID)).toEqual([])

    // The old key gone from the ring: every value still opens (a check opens each one), and a
    // second run finds nothing left to do.
    const checked = await run({ NUXT_DATA_KEY: NEW_KEY, NUXT_DATA_KEY_ID: NEW_KEY_ID, NUXT_DATA_KEYS_PREVIOUS: '' }, ['--check'])
    expect(checked.status, checked.out).toBe(0)
    expect(checked.totals).toMatchObject({ checkOnly: true, failed: 0, rotated: 0, alreadyCurrent: after.length })
    // …and the check is a real one: with only the old key, nothing opens.
    const oldOnly = await run({ NUXT_DATA_KEY: TEST_DATA_KEY, NUXT_DATA_KEY_ID: TEST_DATA_KEY_ID, NUXT_DATA_KEYS_PREVIOUS: '' }, ['--check'])
    expect(oldOnly.status).toBe(1)
    expect(oldOnly.totals.failed).toBe(after.length)
    // Opened here with the new key alone.
    process.env.NUXT_DATA_KEY = NEW_KEY
    process.env.NUXT_DATA_KEY_ID = NEW_KEY_ID
    process.env.NUXT_DATA_KEYS_PREVIOUS = ''
    expect((await participantsOf(a.bookingId)).map((p) => p.passport)).toEqual([a.d[0]!.passport, a.d[1]!.passport])
    // The app (which has the new key among its previous ones) still exports them.
    const x = await api('/api/me/export', { cookie: await signIn(TRAVELLER2) })
    expect(x.body.participants.filter((p: { bookingId: number }) => p.bookingId === a.bookingId).map((p: { passportNumber: string }) => p.passportNumber)).toEqual([a.d[0]!.passport, a.d[1]!.passport])
  }, 120_000)

  it(`purges participant details ${DAYS} days after the trip ends (NUXT_PERSONAL_DATA_DAYS), not a day before`, async () => {
    // Runs last: it moves the app's clock by weeks.
    const today = (await advanceClock(0)).slice(0, 10)
    const addDays = (d: string, n: number) => new Date(Date.parse(`${d}T00:00:00Z`) + n * 86_400_000).toISOString().slice(0, 10)
    const trav = await signIn(TRAVELLER)
    // One trip ended 10 days ago, another 5 days ago (both set in the database: trips cannot be made in the past).
    const endedTrip = await publishedTrip()
    const laterTrip = await publishedTrip()
    const ended = await hold(trav, endedTrip, 1)
    const later = await hold(trav, laterTrip, 1)
    await db.updateTable('trips').set({ start_date: addDays(today, -14), end_date: addDays(today, -10) }).where('id', '=', endedTrip).execute()
    await db.updateTable('trips').set({ start_date: addDays(today, -9), end_date: addDays(today, -5) }).where('id', '=', laterTrip).execute()
    const de = details('E')
    const dl = details('L')
    await addParticipant(ended, 1, de)
    await addParticipant(later, 1, dl)
    const stateOf = async (bookingId: number) => (await db.selectFrom('participants').select(['full_name', 'passport_number_sealed', 'erased_at']).where('booking_id', '=', bookingId).executeTakeFirstOrThrow())
    /** Waits until a purge run has happened at or after `movedTo` (its lease is stamped from the app's clock). */
    const purgeRanAfter = async (movedTo: string) => {
      const lease = await until(() => db.selectFrom('job_leases').select('expires_at').where('name', '=', 'personal-data-purge').executeTakeFirst(),
        (l) => !!l && l.expires_at > movedTo, 30_000)
      expect(lease!.expires_at > movedTo).toBe(true)
    }

    // Day D + DAYS of the first trip: still kept.
    const dayBefore = await advanceClock((DAYS - 10) * 86_400_000)
    await purgeRanAfter(dayBefore)
    await purgeRanAfter(await advanceClock(0))
    expect((await stateOf(ended)).full_name).toBe(de.fullName)
    expect((await stateOf(later)).full_name).toBe(dl.fullName)

    // One day later: the first trip's details go, the later trip's stay.
    await advanceClock(86_400_000)
    const purged = await until(() => stateOf(ended), (s) => s.erased_at !== null, 30_000)
    expect(purged).toMatchObject({ full_name: null, passport_number_sealed: null })
    expect(purged.erased_at).not.toBeNull()
    expect((await stateOf(later)).full_name).toBe(dl.fullName)
    const audit = await db.selectFrom('audit_log').select('detail').where('action', '=', 'participants_purged').execute()
    expect(audit.map((x) => JSON.parse(x.detail!))).toContainEqual({ tripId: endedTrip, participants: 1, days: DAYS })
    expect(JSON.stringify(audit)).not.toContain(de.fullName)
  }, 120_000)
})
