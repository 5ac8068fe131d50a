import { readFileSync, existsSync } from 'node:fs'
import { sql } from 'kysely'
import { afterAll, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/database/connection'
import { isPostgresUrl } from '../../server/database/dialect'
import { unseal } from '../../server/services/sealed'
import { advanceClock, api, caughtMail, inviteAndChoosePassword, linkToken, ORGANISER, signIn, TEST_DATA_KEY, TEST_DATA_KEY_ID, TEST_DB, TRAVELLER, useApp } from './app'

// X-Forwarded-For is believed from the loopback proxy, so each test can speak from its own address.
const { dbTarget } = await useApp({ NUXT_TRUSTED_PROXIES: '127.0.0.1' })
const db = openDatabase(dbTarget)
afterAll(() => db.destroy())
// The app's session secret (tests/server/app.ts): sealed outbox tokens are opened with its derived key.
process.env.NUXT_SESSION_PASSWORD = 'test-session-password-that-is-long-enough-0123456789'
// …and its data key, which seals them (tests/server/app.ts).
Object.assign(process.env, { NUXT_DATA_KEY: TEST_DATA_KEY, NUXT_DATA_KEY_ID: TEST_DATA_KEY_ID })

const from = (ip: string) => ({ 'x-forwarded-for': ip })
const reset = (email: string, ip: string) => api('/api/auth/password-reset', { method: 'POST', body: { email }, headers: from(ip) })
const confirm = (token: string, password: string) => api('/api/auth/password-reset/confirm', { method: 'POST', body: { token, password } })

/** Every outbox row as one string per row, read from the database itself (not through the app). */
async function outboxRows(): Promise<Array<{ text: string; status: string; kind: string; to: string; messageId: string; sealed: string | null }>> {
  const rows = await db.selectFrom('outbox').selectAll().execute()
  return rows.map((r) => ({ text: JSON.stringify(r), status: r.status, kind: r.kind, to: r.to_email, messageId: r.message_id, sealed: r.sealed_secret }))
}

/** Whether a token appears anywhere at rest: every outbox row, and on SQLite the raw database file and its WAL. */
async function foundAtRest(token: string): Promise<string[]> {
  const where: string[] = []
  for (const r of await outboxRows()) if (r.text.includes(token)) where.push(`outbox row ${r.messageId}`)
  if (isPostgresUrl(dbTarget)) {
    // PostgreSQL: every row of every table that holds tokens or mail, as text.
    for (const t of ['outbox', 'account_tokens', 'email_confirmations', 'audit_log']) {
      const rows = await sql<{ row: string }>`select t::text as row from ${sql.table(t)} t`.execute(db)
      if (rows.rows.some((r) => r.row.includes(token))) where.push(`table ${t}`)
    }
  } else {
    for (const f of [dbTarget, `${dbTarget}-wal`]) if (existsSync(f) && readFileSync(f).includes(Buffer.from(token))) where.push(f)
  }
  return where
}

describe(`password reset (${TEST_DB})`, () => {
  it('answers a known and an unknown address alike: same status, same body (no enumeration)', async () => {
    const known = await reset(TRAVELLER, '198.51.100.1')
    const unknown = await reset('nobody-at-all@umbrafield.test', '198.51.100.1')
    expect(known.status).toBe(202)
    expect(unknown.status).toBe(202)
    expect(unknown.body).toEqual(known.body)
    expect(unknown.headers.get('content-length')).toBe(known.headers.get('content-length'))
    // Both addresses hear about it by e-mail; only the account holder gets a link.
    const linkMail = await caughtMail(TRAVELLER, /new password/)
    expect(linkToken(linkMail)).toMatch(/^[A-Za-z0-9_-]{32}$/)
    const noAccount = await caughtMail('nobody-at-all@umbrafield.test', /No Umbrafield account/)
    expect(noAccount.text).not.toMatch(/token=/)
  })

  it('a link works once, ends every session, and the old password stops working; a reused link is token_invalid', async () => {
    const org = await signIn(ORGANISER)
    await inviteAndChoosePassword(org, { name: 'Reset Me', email: 'reset-me@umbrafield.test', role: 'guide' }, 'first-password-1')
    const phone = await signIn('reset-me@umbrafield.test', 'first-password-1')
    const laptop = await signIn('reset-me@umbrafield.test', 'first-password-1')
    expect((await reset('reset-me@umbrafield.test', '198.51.100.2')).status).toBe(202)
    const token = linkToken(await caughtMail('reset-me@umbrafield.test', /new password/))
    // The sign-up strength rule, naming the field.
    const weak = await confirm(token, 'short')
    expect(weak.status).toBe(400)
    expect(weak.body.data.fields.password).toBe('Use at least 10 characters')
    expect((await confirm(token, 'second-password-2')).status).toBe(200)
    expect((await api('/api/me', { cookie: phone })).status).toBe(401)
    expect((await api('/api/me', { cookie: laptop })).status).toBe(401)
    await expect(signIn('reset-me@umbrafield.test', 'first-password-1')).rejects.toThrow(/401/)
    const fresh = await signIn('reset-me@umbrafield.test', 'second-password-2')
    // Reusing the link (someone who saw it later) sets nothing and ends nothing.
    const again = await confirm(token, 'attacker-password-3')
    expect(again.status).toBe(400)
    expect(again.body.data.code).toBe('token_invalid')
    expect((await api('/api/me', { cookie: fresh })).status).toBe(200)
    await expect(signIn('reset-me@umbrafield.test', 'attacker-password-3')).rejects.toThrow(/401/)
  })

  it('an unknown token is token_invalid; a newer request ends the older link', async () => {
    const unknown = await confirm('A'.repeat(32), 'whatever-password')
    expect(unknown.status).toBe(400)
    expect(unknown.body.data.code).toBe('token_invalid')
    const first = await caughtMail(TRAVELLER, /new password/)
    expect((await reset(TRAVELLER, '198.51.100.3')).status).toBe(202)
    const second = await caughtMail(TRAVELLER, /new password/, { ignore: [first.id] })
    const older = await confirm(linkToken(first), 'older-link-password')
    expect(older.status).toBe(400)
    expect(older.body.data.code).toBe('token_invalid')
    expect((await confirm(linkToken(second), 'eclipse-demo-again')).status).toBe(200)
    expect((await api('/api/me', { cookie: await signIn(TRAVELLER, 'eclipse-demo-again') })).status).toBe(200)
  })

  it('is limited per address and per client address (429 with Retry-After)', async () => {
    // Per address: five an hour, wherever they come from.
    for (let i = 0; i < 5; i++) expect((await reset('limited@umbrafield.test', `198.51.100.${10 + i}`)).status).toBe(202)
    const byAddress = await reset('limited@umbrafield.test', '198.51.100.20')
    expect(byAddress.status).toBe(429)
    expect(Number(byAddress.headers.get('retry-after'))).toBeGreaterThan(0)
    // Per client address: twenty an hour, whatever addresses it asks about.
    for (let i = 0; i < 20; i++) expect((await reset(`spray${i}@umbrafield.test`, '198.51.100.30')).status).toBe(202)
    const byIp = await reset('spray-last@umbrafield.test', '198.51.100.30')
    expect(byIp.status).toBe(429)
    expect(Number(byIp.headers.get('retry-after'))).toBeGreaterThan(0)
    expect((await reset('spray-last@umbrafield.test', '198.51.100.31')).status).toBe(202)
  })

  it('a link left for more than an hour is token_invalid (the app clock moves, nobody waits)', async () => {
    expect((await reset('guide@umbrafield.test', '198.51.100.40')).status).toBe(202)
    const token = linkToken(await caughtMail('guide@umbrafield.test', /new password/))
    await advanceClock(60 * 60_000 + 1000)
    const late = await confirm(token, 'too-late-password')
    expect(late.status).toBe(400)
    expect(late.body.data.code).toBe('token_invalid')
    expect((await api('/api/me', { cookie: await signIn('guide@umbrafield.test') })).status).toBe(200)
  })
})

describe(`invitations (${TEST_DB})`, () => {
  it('return and show no password; the invitee cannot sign in until choosing one through the link', async () => {
    const org = await signIn(ORGANISER)
    const inv = await api('/api/users', { method: 'POST', body: { name: 'No Password Yet', email: 'no-pw-yet@umbrafield.test', role: 'guide' }, cookie: org })
    expect(inv.status).toBe(201)
    expect(Object.keys(inv.body).sort()).toEqual(['message', 'user'])
    expect(JSON.stringify(inv.body)).not.toMatch(/password"|temporary/i)
    // Nothing the organiser might have seen or guessed opens the account.
    for (const guess of ['eclipse-demo', '', 'no-pw-yet@umbrafield.test', 'password123']) {
      const r = await api('/api/auth/login', { method: 'POST', body: { email: 'no-pw-yet@umbrafield.test', password: guess || 'x' }, headers: from('198.51.100.50') })
      expect(r.status).toBe(401)
    }
    // Nor does the audit trail or the queued mail carry one: the audit says who and which role only.
    const audited = await db.selectFrom('audit_log').select(['action', 'detail']).where('subject_user_id', '=', inv.body.user.id).execute()
    expect(audited.map((a) => a.action)).toContain('invite')
    for (const a of audited) expect(String(a.detail ?? '')).not.toMatch(/password|hash|argon|scrypt/i)
    const mail = await caughtMail('no-pw-yet@umbrafield.test', /invited/)
    // The mail's only secret is the link's token (checked at rest below, in "one-time tokens at rest").
    expect(mail.text.replace(/https?:\/\/\S+/g, '')).not.toMatch(/password:|temporary|\$argon|\$scrypt/i)
    expect(mail.text).toMatch(/Choose your password/)
    expect(mail.text).toMatch(/\/reset-password\?token=[A-Za-z0-9_-]+&invite=1/)
    expect(mail.text).toMatch(/7 days/)
    const page = await api(`/reset-password?token=${linkToken(mail)}&invite=1`)
    expect(page.body).toContain('Choose your password')
    expect((await confirm(linkToken(mail), 'my-own-password'))).toMatchObject({ status: 200 })
    expect((await api('/api/me', { cookie: await signIn('no-pw-yet@umbrafield.test', 'my-own-password') })).body.role).toBe('guide')
  })

  it('an invitation link lasts seven days, not longer', async () => {
    const org = await signIn(ORGANISER)
    await api('/api/users', { method: 'POST', body: { name: 'Slow Invitee', email: 'slow-invitee@umbrafield.test', role: 'guide' }, cookie: org })
    await api('/api/users', { method: 'POST', body: { name: 'Prompt Invitee', email: 'prompt-invitee@umbrafield.test', role: 'guide' }, cookie: org })
    const slow = linkToken(await caughtMail('slow-invitee@umbrafield.test', /invited/))
    const prompt = linkToken(await caughtMail('prompt-invitee@umbrafield.test', /invited/))
    await advanceClock(7 * 24 * 3600_000 - 60_000)
    expect((await confirm(prompt, 'in-time-password')).status).toBe(200)
    await advanceClock(2 * 60_000)
    const late = await confirm(slow, 'late-password-1')
    expect(late.status).toBe(400)
    expect(late.body.data.code).toBe('token_invalid')
  })
})

describe(`ended cookies (${TEST_DB})`, () => {
  it('signing out with an ended cookie does not end the sessions begun since', async () => {
    const org = await signIn(ORGANISER)
    await inviteAndChoosePassword(org, { name: 'Three Devices', email: 'three-devices@umbrafield.test', role: 'guide' }, 'three-devices-pw')
    const a = await signIn('three-devices@umbrafield.test', 'three-devices-pw')
    const b = await signIn('three-devices@umbrafield.test', 'three-devices-pw')
    expect((await api('/api/auth/sign-out-everywhere', { method: 'POST', cookie: a })).status).toBe(200)
    expect((await api('/api/me', { cookie: b })).status).toBe(401)
    const c = await signIn('three-devices@umbrafield.test', 'three-devices-pw')
    const version = async () => (await db.selectFrom('users').select('session_version').where('email', '=', 'three-devices@umbrafield.test').executeTakeFirstOrThrow()).session_version
    const before = await version()
    // B's cookie ended with the first "sign out everywhere": replaying it must not end C.
    expect((await api('/api/auth/sign-out-everywhere', { method: 'POST', cookie: b })).status).toBe(401)
    const out = await api('/api/auth/logout', { method: 'POST', cookie: b })
    expect(out.status).toBe(200)
    expect((await api('/api/auth/logout', { method: 'POST', cookie: a })).status).toBe(200)
    expect(await version()).toBe(before)
    expect((await api('/api/me', { cookie: c })).status).toBe(200)
    // C signing out is a current cookie: that one does end the sessions.
    expect((await api('/api/auth/logout', { method: 'POST', cookie: c })).status).toBe(200)
    expect(await version()).toBe(before + 1)
    expect((await api('/api/me', { cookie: c })).status).toBe(401)
  })
})

describe(`the last organiser (${TEST_DB})`, () => {
  it('two organisers demoting each other at once leave one organiser, round after round', async () => {
    let one = await signIn(ORGANISER)
    await inviteAndChoosePassword(one, { name: 'Second Organiser', email: 'second-organiser@umbrafield.test', role: 'organiser' }, 'second-organiser-pw')
    let two = await signIn('second-organiser@umbrafield.test', 'second-organiser-pw')
    const ids = async () => {
      const rows = await db.selectFrom('users').select(['id', 'email', 'role']).where('email', 'in', [ORGANISER, 'second-organiser@umbrafield.test']).execute()
      return { one: rows.find((r) => r.email === ORGANISER)!.id, two: rows.find((r) => r.email !== ORGANISER)!.id }
    }
    const organisers = async () => Number((await db.selectFrom('users').select((eb) => eb.fn.countAll().as('n')).where('role', '=', 'organiser').executeTakeFirstOrThrow()).n)
    const { one: oneId, two: twoId } = await ids()
    const base = await organisers()
    // Only these two are organisers (the demo has one; the invitation made the second).
    expect(base).toBe(2)
    for (let round = 0; round < 6; round++) {
      const [r1, r2] = await Promise.all([
        api(`/api/users/${twoId}`, { method: 'PATCH', body: { role: 'guide' }, cookie: one }),
        api(`/api/users/${oneId}`, { method: 'PATCH', body: { role: 'guide' }, cookie: two }),
      ])
      expect(await organisers(), `round ${round}: ${r1.status}/${r2.status}`).toBe(1)
      expect([r1.status, r2.status].filter((s) => s === 200)).toHaveLength(1)
      // The loser is refused: its actor was demoted first (403, or 401 once its session ended) or it was the last (409).
      for (const r of [r1, r2]) expect([200, 401, 403, 409]).toContain(r.status)
      // The one left promotes the other back; both sign in afresh (a role change ends sessions).
      const oneWon = r1.status === 200
      const winner = oneWon ? await signIn(ORGANISER) : await signIn('second-organiser@umbrafield.test', 'second-organiser-pw')
      expect((await api(`/api/users/${oneWon ? twoId : oneId}`, { method: 'PATCH', body: { role: 'organiser' }, cookie: winner })).status).toBe(200)
      one = await signIn(ORGANISER)
      two = await signIn('second-organiser@umbrafield.test', 'second-organiser-pw')
    }
    expect(await organisers()).toBe(2)
  })
})

describe(`one-time tokens at rest (${TEST_DB})`, () => {
  it('confirmation, reset and invitation tokens are in no outbox row (queued or sent) nor the database file; the mail holds the working link', async () => {
    const org = await signIn(ORGANISER)
    const seenQueued: Array<{ messageId: string; sealed: string; to: string; kind: string }> = []
    const snapshot = async (to: string) => {
      const rows = (await outboxRows()).filter((r) => r.to === to)
      for (const r of rows) if (r.status === 'queued' && r.sealed) seenQueued.push({ messageId: r.messageId, sealed: r.sealed, to, kind: r.kind })
      return rows.map((r) => r.text)
    }
    const snaps: string[] = []

    // Sign-up (confirmation link), and its resend.
    const reg = await api('/api/auth/register', { method: 'POST', body: { name: 'Sealed Signup', email: 'sealed-signup@umbrafield.test', password: 'sealed-signup-pw' } })
    expect(reg.status).toBe(202)
    snaps.push(...await snapshot('sealed-signup@umbrafield.test'))
    const confirmMail = await caughtMail('sealed-signup@umbrafield.test', /Confirm your e-mail/)
    const confirmToken = linkToken(confirmMail, '/verify-email')
    const signupCookie = await signIn('sealed-signup@umbrafield.test', 'sealed-signup-pw')
    await advanceClock(61_000)
    expect((await api('/api/auth/confirmation', { method: 'POST', cookie: signupCookie })).status).toBe(200)
    snaps.push(...await snapshot('sealed-signup@umbrafield.test'))
    const resendMail = await caughtMail('sealed-signup@umbrafield.test', /Confirm your e-mail/, { ignore: [confirmMail.id] })
    const resendToken = linkToken(resendMail, '/verify-email')

    // Reset and invitation.
    expect((await reset('sealed-signup@umbrafield.test', '198.51.100.60')).status).toBe(202)
    snaps.push(...await snapshot('sealed-signup@umbrafield.test'))
    const resetToken = linkToken(await caughtMail('sealed-signup@umbrafield.test', /new password/))
    expect((await api('/api/users', { method: 'POST', body: { name: 'Sealed Invitee', email: 'sealed-invitee@umbrafield.test', role: 'guide' }, cookie: org })).status).toBe(201)
    snaps.push(...await snapshot('sealed-invitee@umbrafield.test'))
    const inviteToken = linkToken(await caughtMail('sealed-invitee@umbrafield.test', /invited/))

    const tokens = [confirmToken, resendToken, resetToken, inviteToken]
    expect(new Set(tokens).size).toBe(4)
    // The mail worker sends within a few hundred ms; right after the request, most rows are still
    // queued. Those seen queued hold their token sealed (and it opens to the mailed one).
    expect(seenQueued.length).toBeGreaterThan(0)
    for (const q of seenQueued) expect(tokens).toContain(unseal(q.sealed, `outbox:${q.messageId}`))
    for (const t of tokens) {
      expect(snaps.filter((s) => s.includes(t))).toEqual([])
      expect(await foundAtRest(t)).toEqual([])
    }
    // Sent: nothing sealed is kept either.
    const sent = (await outboxRows()).filter((r) => ['sealed-signup@umbrafield.test', 'sealed-invitee@umbrafield.test'].includes(r.to))
    expect(sent.length).toBeGreaterThanOrEqual(4)
    for (const r of sent) { expect(r.status).toBe('sent'); expect(r.sealed).toBeNull() }
    // The organiser's outbox view shows neither links nor tokens.
    const view = JSON.stringify((await api('/api/outbox', { cookie: org })).body)
    expect(view).not.toMatch(/token=|secret/)
    for (const t of tokens) expect(view).not.toContain(t)
    // The links in the mail work.
    expect((await api('/api/auth/verify-email', { method: 'POST', body: { token: resendToken } })).status).toBe(200)
    expect((await confirm(resetToken, 'sealed-new-password')).status).toBe(200)
    expect((await confirm(inviteToken, 'sealed-invitee-pw')).status).toBe(200)
    await signIn('sealed-invitee@umbrafield.test', 'sealed-invitee-pw')
  })
})

describe('links that others cannot end', () => {
  it('asking for a reset with an invitee\'s address does not end their invitation', async () => {
    const org = await signIn(ORGANISER)
    const email = `invitee-kept-${Date.now()}@umbrafield.test`
    expect((await api('/api/users', { method: 'POST', body: { name: 'Kept Invitee (test)', email, role: 'guide' }, cookie: org })).status).toBe(201)
    const invitation = await caughtMail(email, /invited/)
    expect((await reset(email, '203.0.113.77')).status).toBe(202)
    await caughtMail(email, /new password/, { ignore: [invitation.id] })
    // The invitation's own link still works after someone asked for a reset in the invitee's name.
    expect((await confirm(linkToken(invitation), 'kept-invitation-password')).status).toBe(200)
    expect(await signIn(email, 'kept-invitation-password')).toBeTruthy()
  })
})
