import { describe, expect, it } from 'vitest'
import { api, GUIDE, inviteAndChoosePassword, ORGANISER, signIn, TRAVELLER, TRAVELLER2, useApp } from './app'

await useApp()

describe('sign-in', () => {
  it('a bad login body gets 400 with field messages', async () => {
    const r = await api('/api/auth/login', { method: 'POST', body: { email: 'not-an-email' } })
    expect(r.status).toBe(400)
    expect(r.body.data.fields.email).toMatch(/valid e-mail/)
    expect(r.body.data.fields.password).toMatch(/password/i)
    expect(JSON.stringify(r.body)).not.toMatch(/at .*\.mjs|stack/i)
  })

  it('a body that is not JSON gets 400, not a stack trace', async () => {
    const r = await api('/api/auth/login', { method: 'POST', raw: '{"email":', headers: { 'content-type': 'application/json' } })
    expect(r.status).toBe(400)
    expect(JSON.stringify(r.body)).not.toMatch(/\.mjs:\d+|node_modules/)
  })

  it('wrong credentials get one generic message, for unknown and known e-mails alike', async () => {
    const a = await api('/api/auth/login', { method: 'POST', body: { email: 'nobody@umbrafield.test', password: 'x' } })
    const b = await api('/api/auth/login', { method: 'POST', body: { email: GUIDE, password: 'wrong-password' } })
    expect(a.status).toBe(401)
    expect(b.status).toBe(401)
    expect(a.body.message).toBe(b.body.message)
  })

  it('ten wrong passwords in a row are throttled, and the right one then waits too', async () => {
    const email = 'throttle-me@umbrafield.test'
    const reg = await api('/api/auth/register', { method: 'POST', body: { name: 'Throttle Test', email, password: 'correct-horse-battery' } })
    expect(reg.status).toBe(202)
    const statuses: number[] = []
    for (let i = 0; i < 10; i++) {
      statuses.push((await api('/api/auth/login', { method: 'POST', body: { email, password: `wrong-${i}` } })).status)
    }
    expect(statuses.slice(0, 5)).toEqual([401, 401, 401, 401, 401])
    expect(statuses.slice(5)).toEqual([429, 429, 429, 429, 429])
    const right = await api('/api/auth/login', { method: 'POST', body: { email, password: 'correct-horse-battery' } })
    expect(right.status).toBe(429)
    const wait = Number(right.headers.get('retry-after'))
    expect(wait).toBeGreaterThan(0)
    // Backoff, not a lock: after the wait the owner gets in.
    await new Promise((r) => setTimeout(r, wait * 1000 + 100))
    expect((await api('/api/auth/login', { method: 'POST', body: { email, password: 'correct-horse-battery' } })).status).toBe(200)
  })

  it('concurrent guesses queue behind the throttle instead of all passing', async () => {
    const email = 'parallel-guess@umbrafield.test'
    const statuses = await Promise.all(Array.from({ length: 20 }, (_, i) => api('/api/auth/login', { method: 'POST', body: { email, password: `guess-${i}` } }).then((r) => r.status)))
    expect(statuses.filter((s) => s === 401)).toHaveLength(5)
    expect(statuses.filter((s) => s === 429)).toHaveLength(15)
  })

  it('successful sign-ins do not count towards the throttle', async () => {
    for (let i = 0; i < 8; i++) await signIn(GUIDE)
    expect((await api('/api/auth/login', { method: 'POST', body: { email: GUIDE, password: 'eclipse-demo' } })).status).toBe(200)
  })

  it('sign-up creates a traveller, and answers the same when the address already has an account', async () => {
    const r = await api('/api/auth/register', { method: 'POST', body: { name: 'New Person', email: 'New.Person@Example.test', password: 'long-enough-pass' } })
    expect(r.status).toBe(202)
    expect(r.headers.getSetCookie()).toEqual([])
    const me = await api('/api/me', { cookie: await signIn('new.person@example.test', 'long-enough-pass') })
    expect(me.body).toMatchObject({ role: 'traveller', email: 'new.person@example.test', emailConfirmed: false })
    const again = await api('/api/auth/register', { method: 'POST', body: { name: 'Again', email: 'new.person@example.test', password: 'other-long-pass' } })
    expect(again.status).toBe(r.status)
    expect(again.body.message.replace('new.person@example.test', '')).toBe(r.body.message.replace('new.person@example.test', ''))
    // The existing account's password is unchanged.
    expect((await api('/api/auth/login', { method: 'POST', body: { email: 'new.person@example.test', password: 'other-long-pass' } })).status).toBe(401)
  })

  it('sign-out ends the session', async () => {
    const cookie = await signIn(TRAVELLER)
    expect((await api('/api/me', { cookie })).status).toBe(200)
    const out = await api('/api/auth/logout', { method: 'POST', cookie })
    const cleared = out.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ')
    expect((await api('/api/me', { cookie: cleared })).status).toBe(401)
  })
})

describe('role boundaries', () => {
  it('GET /api/users: 401 signed out, 403 traveller, 403 guide, 200 organiser', async () => {
    expect((await api('/api/users')).status).toBe(401)
    expect((await api('/api/users', { cookie: await signIn(TRAVELLER) })).status).toBe(403)
    expect((await api('/api/users', { cookie: await signIn(GUIDE) })).status).toBe(403)
    const ok = await api('/api/users', { cookie: await signIn(ORGANISER) })
    expect(ok.status).toBe(200)
    expect(ok.body.data.length).toBeGreaterThanOrEqual(4)
    expect(ok.body.data[0]).not.toHaveProperty('password_hash')
  })

  it('only organisers change roles or invite', async () => {
    const guide = await signIn(GUIDE)
    expect((await api('/api/users/3', { method: 'PATCH', body: { role: 'organiser' }, cookie: guide })).status).toBe(403)
    expect((await api('/api/users', { method: 'POST', body: { name: 'X', email: 'x@y.test', role: 'guide' }, cookie: guide })).status).toBe(403)
    const org = await signIn(ORGANISER)
    expect((await api('/api/users/3', { method: 'PATCH', body: { role: 'emperor' }, cookie: org })).status).toBe(400)
    expect((await api('/api/users/999', { method: 'PATCH', body: { role: 'guide' }, cookie: org })).status).toBe(404)
  })

  it('a role change ends the person\'s sessions; signing in again shows the new role, and a demotion removes privileges at once', async () => {
    const traveller = await signIn(TRAVELLER2)
    expect((await api('/api/me', { cookie: traveller })).body.role).toBe('traveller')
    const org = await signIn(ORGANISER)
    const users = (await api('/api/users', { cookie: org })).body.data as Array<{ id: number; email: string }>
    const id = users.find((u) => u.email === TRAVELLER2)!.id
    const r = await api(`/api/users/${id}`, { method: 'PATCH', body: { role: 'guide' }, cookie: org })
    expect(r.status).toBe(200)
    expect((await api('/api/me', { cookie: traveller })).status).toBe(401)
    const again = await signIn(TRAVELLER2)
    expect((await api('/api/me', { cookie: again })).body.role).toBe('guide')
    await api(`/api/users/${id}`, { method: 'PATCH', body: { role: 'organiser' }, cookie: org })
    const asOrganiser = await signIn(TRAVELLER2)
    expect((await api('/api/users', { cookie: asOrganiser })).status).toBe(200)
    await api(`/api/users/${id}`, { method: 'PATCH', body: { role: 'traveller' }, cookie: org })
    expect((await api('/api/users', { cookie: asOrganiser })).status).toBe(401)
    expect((await api('/api/users', { cookie: await signIn(TRAVELLER2) })).status).toBe(403)
  })

  it('an organiser invites a guide, who chooses a password through the e-mailed link and signs in with it', async () => {
    const org = await signIn(ORGANISER)
    const r = await inviteAndChoosePassword(org, { name: 'Invited Guide', email: 'invited@umbrafield.test', role: 'guide' }, 'invited-guide-pw')
    expect(r.status).toBe(201)
    const cookie = await signIn('invited@umbrafield.test', 'invited-guide-pw')
    expect((await api('/api/me', { cookie })).body.role).toBe('guide')
  })

  it('the last organiser cannot be demoted', async () => {
    const org = await signIn(ORGANISER)
    const me = (await api('/api/me', { cookie: org })).body
    const r = await api(`/api/users/${me.id}`, { method: 'PATCH', body: { role: 'guide' }, cookie: org })
    expect(r.status).toBe(409)
  })
})
