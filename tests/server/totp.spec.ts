import { createHmac, randomUUID } from 'node:crypto'
import { url } from '@nuxt/test-utils/e2e'
import { afterAll, beforeEach, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/database/connection'
import { advanceClock, api, GUIDE, ORGANISER, signIn, TEST_DB, TRAVELLER, useApp } from './app'

const { dbTarget } = await useApp()
const db = openDatabase(dbTarget)
afterAll(() => db.destroy())

// Every test starts outside the sign-in throttle's 15-minute window (all requests come from one address).
beforeEach(async () => { await advanceClock(16 * 60_000) })

const PASSWORD = 'a-long-enough-password'

/** The app's "now" (its clock is moved by the tests, so the test's own Date.now() is not it). */
const appNowMs = async () => Date.parse(await advanceClock(0))
/** RFC 4648 §6 Base32 to bytes, written here so the test shares no code with the app. */
function fromBase32(text: string): Buffer {
  const alphabet = 'ABCDEFGHIJKLMNOPQRSTUVWXYZ234567'
  let bits = 0, value = 0
  const out: number[] = []
  for (const ch of text.replace(/=+$/, '')) {
    value = (value << 5) | alphabet.indexOf(ch)
    bits += 5
    if (bits >= 8) { out.push((value >>> (bits - 8)) & 255); bits -= 8 }
  }
  return Buffer.from(out)
}
/**
 * The code an authenticator app would show at `ms`, computed here from RFC 6238 §4 and RFC 4226 §5.3
 * (HMAC-SHA-1 of the 30-second step, dynamic truncation, 6 digits) on node:crypto, not with the app's code.
 */
function codeAt(secret: string, ms: number): string {
  const step = Buffer.alloc(8)
  step.writeBigUInt64BE(BigInt(Math.floor(ms / 1000 / 30)))
  const mac = createHmac('sha1', fromBase32(secret)).update(step).digest()
  const o = mac[mac.length - 1]! & 0x0f
  return String((mac.readUInt32BE(o) & 0x7fffffff) % 1_000_000).padStart(6, '0')
}
/** A 6-digit code that is none of the codes valid around `ms` (so it is wrong for certain). */
async function wrongCode(secret: string, ms: number): Promise<string> {
  const near = new Set(await Promise.all([-30_000, 0, 30_000].map((d) => codeAt(secret, ms + d))))
  let n = Number(await codeAt(secret, ms))
  do n = (n + 1) % 1_000_000; while (near.has(String(n).padStart(6, '0')))
  return String(n).padStart(6, '0')
}

async function login(email: string, password: string, totp?: string) {
  const res = await fetch(url('/api/auth/login'), { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password, ...(totp !== undefined ? { totp } : {}) }) })
  const body = await res.json() as { id?: number; data?: { code?: string }; message?: string }
  return { status: res.status, body, cookie: res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ') }
}

/** A fresh traveller account (optionally promoted by the demo organiser), signed in. */
async function newAccount(role: 'traveller' | 'guide' = 'traveller') {
  const email = `totp-${randomUUID().slice(0, 8)}@umbrafield.test`
  expect((await api('/api/auth/register', { method: 'POST', body: { name: 'Two Factor Test', email, password: PASSWORD } })).status).toBe(202)
  let r = await login(email, PASSWORD)
  expect(r.status).toBe(200)
  if (role !== 'traveller') {
    expect((await api(`/api/users/${r.body.id}`, { method: 'PATCH', body: { role }, cookie: await signIn(ORGANISER) })).status).toBe(200)
    r = await login(email, PASSWORD)
  }
  return { email, id: r.body.id!, cookie: r.cookie }
}

/** Sets up two-factor through the routes; the clock then moves one step on so the confirming code is spent. */
async function enableTotp(cookie: string) {
  const setup = await api('/api/me/totp', { method: 'POST', cookie })
  expect(setup.status).toBe(200)
  const { secret } = setup.body as { secret: string }
  const confirm = await api('/api/me/totp/confirm', { method: 'POST', cookie, body: { code: await codeAt(secret, await appNowMs()) } })
  expect(confirm.status).toBe(200)
  await advanceClock(30_000)
  return { secret, recoveryCodes: confirm.body.recoveryCodes as string[] }
}

describe(`two-factor sign-in (${TEST_DB})`, () => {
  it('set-up offers a Base32 secret, an otpauth URI for Umbrafield and the account, and a QR code', async () => {
    const { email, cookie } = await newAccount()
    const r = await api('/api/me/totp', { method: 'POST', cookie })
    expect(r.status).toBe(200)
    expect(r.body.secret).toMatch(/^[A-Z2-7]{32}$/)
    const uri = new URL(r.body.otpauthUrl)
    expect(uri.protocol).toBe('otpauth:')
    expect(uri.searchParams.get('issuer')).toBe('Umbrafield')
    expect(uri.searchParams.get('secret')).toBe(r.body.secret)
    expect(decodeURIComponent(uri.pathname)).toContain(`Umbrafield:${email}`)
    expect(r.body.qrSvg).toMatch(/^<svg[\s\S]*<\/svg>\s*$/)
    // Not on until a code confirms it: sign-in still needs only the password.
    expect((await login(email, PASSWORD)).status).toBe(200)
    // A wrong confirmation code is refused and leaves it off.
    const bad = await api('/api/me/totp/confirm', { method: 'POST', cookie, body: { code: await wrongCode(r.body.secret, await appNowMs()) } })
    expect(bad.status).toBe(400)
    expect(bad.body.data.code).toBe('totp_invalid')
    expect((await api('/api/me/totp', { cookie })).body).toMatchObject({ enabled: false, pending: true })
  })

  it('confirming turns it on with ten different recovery codes; a second set-up is refused while it is on', async () => {
    const { cookie } = await newAccount()
    const { recoveryCodes } = await enableTotp(cookie)
    expect(recoveryCodes).toHaveLength(10)
    expect(new Set(recoveryCodes).size).toBe(10)
    expect((await api('/api/me/totp', { cookie })).body).toMatchObject({ enabled: true, recoveryCodesLeft: 10 })
    expect((await api('/api/me', { cookie })).body.twoFactor).toEqual({ enabled: true, setupRequired: false })
    const again = await api('/api/me/totp', { method: 'POST', cookie })
    expect(again.status).toBe(409)
    expect(again.body.data.code).toBe('totp_already_enabled')
  })

  it('attack: signing in with the password alone gets no session (totp_required), and only after the password is checked', async () => {
    const { email, cookie } = await newAccount()
    await enableTotp(cookie)
    const wrongPassword = await login(email, 'not-the-password')
    expect(wrongPassword.status).toBe(401)
    expect(wrongPassword.body.data?.code).toBeUndefined()
    expect(wrongPassword.body.message).toBe('E-mail or password is not right')
    const noCode = await login(email, PASSWORD)
    expect(noCode.status).toBe(401)
    expect(noCode.body.data?.code).toBe('totp_required')
    expect(noCode.cookie).toBe('')
  })

  it('attack: a wrong code is refused; the right one signs in', async () => {
    const { email, cookie } = await newAccount()
    const { secret } = await enableTotp(cookie)
    const bad = await login(email, PASSWORD, await wrongCode(secret, await appNowMs()))
    expect(bad.status).toBe(401)
    expect(bad.body.data?.code).toBe('totp_invalid')
    expect(bad.cookie).toBe('')
    const good = await login(email, PASSWORD, await codeAt(secret, await appNowMs()))
    expect(good.status).toBe(200)
    expect((await api('/api/me', { cookie: good.cookie })).status).toBe(200)
  })

  it('attack: a code that already signed someone in is refused the second time (replay)', async () => {
    const { email, cookie } = await newAccount()
    const { secret } = await enableTotp(cookie)
    const code = await codeAt(secret, await appNowMs())
    expect((await login(email, PASSWORD, code)).status).toBe(200)
    const replay = await login(email, PASSWORD, code)
    expect(replay.status).toBe(401)
    expect(replay.body.data?.code).toBe('totp_invalid')
    // A racing pair with one fresh code: at most one gets in.
    await advanceClock(30_000)
    const fresh = await codeAt(secret, await appNowMs())
    const pair = await Promise.all([login(email, PASSWORD, fresh), login(email, PASSWORD, fresh)])
    expect(pair.map((p) => p.status).sort()).toEqual([200, 401])
  })

  it('attack: a code from two steps ago is refused; one step of drift is allowed', async () => {
    const { email, cookie } = await newAccount()
    const { secret } = await enableTotp(cookie)
    const old = await codeAt(secret, await appNowMs())
    await advanceClock(61_000) // now at least two 30-s steps later
    const r = await login(email, PASSWORD, old)
    expect(r.status).toBe(401)
    expect(r.body.data?.code).toBe('totp_invalid')
    const previous = await codeAt(secret, await appNowMs())
    await advanceClock(30_000) // one step later: a phone running 30 s slow
    expect((await login(email, PASSWORD, previous)).status).toBe(200)
  })

  it('attack: a recovery code signs in once; used again it is refused', async () => {
    const { email, cookie } = await newAccount()
    const { recoveryCodes } = await enableTotp(cookie)
    const code = recoveryCodes[3]!
    // Typed in lower case without dashes, as people do.
    expect((await login(email, PASSWORD, code.toLowerCase().replace(/-/g, ''))).status).toBe(200)
    const reuse = await login(email, PASSWORD, code)
    expect(reuse.status).toBe(401)
    expect(reuse.body.data?.code).toBe('totp_invalid')
    expect((await login(email, PASSWORD, 'AAAA-BBBB-CCCC-DDDD')).status).toBe(401)
    const ok = await login(email, PASSWORD, recoveryCodes[4]!)
    expect(ok.status).toBe(200)
    expect((await api('/api/me/totp', { cookie: ok.cookie })).body.recoveryCodesLeft).toBe(8)
  })

  it('attack: guessing codes meets the sign-in backoff, even with the right code afterwards', async () => {
    const { email, cookie } = await newAccount()
    const { secret } = await enableTotp(cookie)
    const statuses: number[] = []
    for (let i = 0; i < 6; i++) statuses.push((await login(email, PASSWORD, await wrongCode(secret, await appNowMs()))).status)
    // THROTTLE.freeByKey = 5 failures inside the window, then a wait.
    expect(statuses).toEqual([401, 401, 401, 401, 401, 429])
    expect((await login(email, PASSWORD, await codeAt(secret, await appNowMs()))).status).toBe(429)
  })

  it('attack: guessing slowly, past the backoff, meets a per-account lockout after ten wrong codes a day; recovery codes still work', async () => {
    const { email, cookie } = await newAccount()
    const { secret, recoveryCodes } = await enableTotp(cookie)
    // Each guess 16 minutes after the last, so the 15-minute sign-in backoff never holds it back.
    const statuses: Array<number | string | undefined> = []
    for (let i = 0; i < 10; i++) {
      await advanceClock(16 * 60_000)
      const r = await login(email, PASSWORD, await wrongCode(secret, await appNowMs()))
      statuses.push(r.body.data?.code)
    }
    expect(statuses).toEqual(Array(10).fill('totp_invalid'))
    await advanceClock(16 * 60_000)
    // The eleventh try, with the right code, is refused: the lock does not test the code at all.
    const res = await fetch(url('/api/auth/login'), { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password: PASSWORD, totp: await codeAt(secret, await appNowMs()) }) })
    expect(res.status).toBe(429)
    expect((await res.json()).data.code).toBe('totp_locked')
    expect(res.headers.getSetCookie()).toEqual([])
    // The oldest wrong code was 10 × 16 min ago: the lock lifts when it is a day old.
    const retryAfter = Number(res.headers.get('retry-after'))
    expect(retryAfter).toBeGreaterThan(24 * 3600 - 11 * 16 * 60 - 60)
    expect(retryAfter).toBeLessThanOrEqual(24 * 3600 - 10 * 16 * 60)
    // Turning two-factor off is no way round it.
    await advanceClock(16 * 60_000)
    const off = await api('/api/me/totp', { method: 'DELETE', cookie, body: { password: PASSWORD, totp: await codeAt(secret, await appNowMs()) } })
    expect(off.status).toBe(429)
    expect(off.body.data.code).toBe('totp_locked')
    // The owner gets in with a recovery code meanwhile.
    await advanceClock(16 * 60_000)
    expect((await login(email, PASSWORD, recoveryCodes[0]!)).status).toBe(200)
    // A day after the first wrong code, app codes work again.
    await advanceClock(24 * 3600_000)
    expect((await login(email, PASSWORD, await codeAt(secret, await appNowMs()))).status).toBe(200)
  })

  it('erasing the account leaves none of its throttling rows (they hold client addresses), the two-factor lock\'s included', async () => {
    const { email, id, cookie } = await newAccount()
    const { secret } = await enableTotp(cookie)
    expect((await login(email, PASSWORD, await wrongCode(secret, await appNowMs()))).body.data?.code).toBe('totp_invalid')
    const keys = [email, `totp:${id}`, `password:${id}`]
    const rows = () => db.selectFrom('sign_in_failures').select('email').where('email', 'in', keys).execute()
    expect((await rows()).map((r) => r.email)).toEqual(expect.arrayContaining([email, `totp:${id}`]))
    await advanceClock(16 * 60_000)
    expect((await api('/api/me/erase', { method: 'POST', cookie, body: { password: PASSWORD, confirm: true } })).status).toBe(200)
    expect(await rows()).toEqual([])
  })

  it('attack: turning it off needs the right password and a right code', async () => {
    const { email, cookie } = await newAccount()
    const { secret } = await enableTotp(cookie)
    const wrongPw = await api('/api/me/totp', { method: 'DELETE', cookie, body: { password: 'not-the-password', totp: await codeAt(secret, await appNowMs()) } })
    expect(wrongPw.status).toBe(400)
    expect(wrongPw.body.data.fields.password).toBeTruthy()
    const wrongCodeR = await api('/api/me/totp', { method: 'DELETE', cookie, body: { password: PASSWORD, totp: await wrongCode(secret, await appNowMs()) } })
    expect(wrongCodeR.status).toBe(400)
    expect(wrongCodeR.body.data.code).toBe('totp_invalid')
    expect((await login(email, PASSWORD)).body.data?.code).toBe('totp_required')
    const ok = await api('/api/me/totp', { method: 'DELETE', cookie, body: { password: PASSWORD, totp: await codeAt(secret, await appNowMs()) } })
    expect(ok.status).toBe(200)
    expect((await login(email, PASSWORD)).status).toBe(200)
  })

  it('attack: the database never holds the secret or the recovery codes in clear', async () => {
    const { id, cookie } = await newAccount()
    const setup = await api('/api/me/totp', { method: 'POST', cookie })
    const secret = setup.body.secret as string
    const pendingRow = await db.selectFrom('user_totp').selectAll().where('user_id', '=', id).executeTakeFirstOrThrow()
    expect(pendingRow.pending_sealed).toMatch(/^uf1\./)
    const secretHex = Buffer.from(base32Decode(secret)).toString('hex')
    for (const v of Object.values(pendingRow)) {
      expect(String(v)).not.toContain(secret)
      expect(String(v).toLowerCase()).not.toContain(secretHex)
    }
    const confirm = await api('/api/me/totp/confirm', { method: 'POST', cookie, body: { code: await codeAt(secret, await appNowMs()) } })
    expect(confirm.status).toBe(200)
    const row = await db.selectFrom('user_totp').selectAll().where('user_id', '=', id).executeTakeFirstOrThrow()
    expect(row.secret_sealed).toMatch(/^uf1\./)
    expect(row.pending_sealed).toBeNull()
    for (const v of Object.values(row)) expect(String(v)).not.toContain(secret)
    const stored = JSON.stringify(await db.selectFrom('totp_recovery_codes').selectAll().where('user_id', '=', id).execute())
    for (const c of confirm.body.recoveryCodes as string[]) {
      expect(stored).not.toContain(c)
      expect(stored).not.toContain(c.replace(/-/g, ''))
    }
  })

  it('attack: with the staff rule on, staff without two-factor reach nothing but their set-up; travellers are unaffected', async () => {
    const guide = await newAccount('guide')
    const traveller = await signIn(TRAVELLER)
    const org = await signIn(ORGANISER)
    // Only organisers change the rule.
    expect((await api('/api/settings/security', { method: 'PATCH', cookie: await signIn(GUIDE), body: { requireStaffTotp: true } })).status).toBe(403)
    expect((await api('/api/settings/security', { method: 'PATCH', cookie: traveller, body: { requireStaffTotp: true } })).status).toBe(403)
    expect((await api('/api/settings/security', { method: 'PATCH', cookie: org, body: { requireStaffTotp: 'yes' } })).status).toBe(400)
    const on = await api('/api/settings/security', { method: 'PATCH', cookie: org, body: { requireStaffTotp: true } })
    expect(on.status).toBe(200)
    expect(on.body).toEqual({ requireStaffTotp: true })
    const audited = await db.selectFrom('audit_log').selectAll().where('action', '=', 'security_settings').execute()
    expect(audited.at(-1)!.detail).toContain('"to":true')

    // The guide still signs in (a session), but staff routes answer 403 totp_setup_required …
    const g = await login(guide.email, PASSWORD)
    expect(g.status).toBe(200)
    for (const path of ['/api/workspaces', '/api/places?q=lux', '/api/climatology']) {
      const r = await api(path, { cookie: g.cookie })
      expect(r.status, path).toBe(403)
      expect(r.body.data.code, path).toBe('totp_setup_required')
    }
    // … and so do the organiser's own, the rule's page included.
    const orgBlocked = await api('/api/settings/security', { cookie: org })
    expect(orgBlocked.status).toBe(403)
    expect(orgBlocked.body.data.code).toBe('totp_setup_required')
    // Travellers carry on.
    expect((await api('/api/bookings', { cookie: traveller })).status).toBe(200)

    // What set-up needs still answers: me, me/totp, sign-out.
    expect((await api('/api/me', { cookie: g.cookie })).body.twoFactor).toEqual({ enabled: false, setupRequired: true })
    const { secret } = await enableTotp(g.cookie)
    expect((await api('/api/workspaces', { cookie: g.cookie })).status).toBe(200)
    // Staff may not turn it off while the rule stands, even with the right password and code.
    const off = await api('/api/me/totp', { method: 'DELETE', cookie: g.cookie, body: { password: PASSWORD, totp: await codeAt(secret, await appNowMs()) } })
    expect(off.status).toBe(409)
    expect(off.body.data.code).toBe('totp_required_by_policy')

    // The organiser sets it up too, then lifts the rule for the other tests.
    await enableTotp(org)
    expect((await api('/api/settings/security', { method: 'PATCH', cookie: org, body: { requireStaffTotp: false } })).status).toBe(200)
    expect((await api('/api/auth/logout', { method: 'POST', cookie: g.cookie })).status).toBe(200)
  })
})

/** RFC 4648 Base32 decoding (test-side, to look for the raw key bytes too). */
function base32Decode(s: string): Uint8Array {
  const alphabet = 'ABCDEFGHIJKLMNOPQRSTUVWXYZ234567'
  let bits = 0
  let value = 0
  const out: number[] = []
  for (const ch of s.replace(/=+$/, '')) {
    value = (value << 5) | alphabet.indexOf(ch)
    bits += 5
    if (bits >= 8) { out.push((value >>> (bits - 8)) & 255); bits -= 8 }
  }
  return new Uint8Array(out)
}
