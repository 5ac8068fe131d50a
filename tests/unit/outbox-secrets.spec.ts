import type { Transporter } from 'nodemailer'
import { beforeAll, describe, expect, it } from 'vitest'
import { migrateToLatest, openDatabase } from '../../server/database/connection'
import { migrations } from '../../server/database/migrations'
import { enqueueMail, OUTBOX, processOutbox, retryMessage, SECRET_TOKEN, SecretInBodyError, secretContext } from '../../server/services/outbox'
import { seal, unseal } from '../../server/services/sealed'

beforeAll(() => { process.env.NUXT_SESSION_PASSWORD = 'unit-session-password-that-is-long-enough-0123456789' })

const TOKEN = 'Zx9_one-time-token-0123456789abcd'
const linkMail = (token = SECRET_TOKEN) => ({
  kind: 'password-reset', to: { email: 'a@b.test' }, subject: 'Choose a new password',
  html: `<a href="http://x/reset-password?token=${token}">go</a>`, text: `http://x/reset-password?token=${token}`,
})

/** A transport that records what it was asked to send, or fails every time. */
function transport(fail = false) {
  const sent: Array<{ text: string; html: string }> = []
  const t = { sendMail: async (m: { text: string; html: string }) => { if (fail) throw new Error('smtp down'); sent.push(m); return {} } }
  return { sent, t: t as unknown as Transporter }
}

async function fresh() {
  const db = openDatabase(':memory:')
  await migrateToLatest(db)
  return db
}

describe('one-time tokens in the outbox', () => {
  it('are sealed in the row, put into the link only when sent, then cleared', async () => {
    const db = await fresh()
    await enqueueMail(db, { ...linkMail(), secret: TOKEN })
    const queued = await db.selectFrom('outbox').selectAll().executeTakeFirstOrThrow()
    expect(JSON.stringify(queued)).not.toContain(TOKEN)
    expect(unseal(queued.sealed_secret!, secretContext(queued.message_id))).toBe(TOKEN)
    const { sent, t } = transport()
    expect(await processOutbox(db, t, 'from@x')).toEqual({ sent: 1, failed: 0 })
    expect(sent[0]!.text).toBe(`http://x/reset-password?token=${TOKEN}`)
    expect(sent[0]!.html).toContain(`token=${TOKEN}"`)
    const done = await db.selectFrom('outbox').selectAll().executeTakeFirstOrThrow()
    expect(done.status).toBe('sent')
    expect(done.sealed_secret).toBeNull()
    expect(JSON.stringify(done)).not.toContain(TOKEN)
    await db.destroy()
  })

  it('refuses a message whose body holds the token itself', async () => {
    const db = await fresh()
    await expect(enqueueMail(db, { ...linkMail(TOKEN), secret: TOKEN })).rejects.toThrow(SecretInBodyError)
    expect(await db.selectFrom('outbox').selectAll().execute()).toEqual([])
    await db.destroy()
  })

  it('a sealed token copied into another message does not open there: that message fails unsent', async () => {
    const db = await fresh()
    await enqueueMail(db, { ...linkMail(), secret: TOKEN })
    await enqueueMail(db, { ...linkMail(), to: { email: 'attacker@b.test' }, secret: 'another-token-0123456789abcdef' })
    const [a] = await db.selectFrom('outbox').select(['id', 'sealed_secret']).orderBy('id').execute()
    await db.updateTable('outbox').set({ sealed_secret: a!.sealed_secret }).where('to_email', '=', 'attacker@b.test').execute()
    const { sent, t } = transport()
    expect(await processOutbox(db, t, 'from@x')).toEqual({ sent: 1, failed: 1 })
    expect(sent.map((m) => m.text).filter((x) => x.includes(TOKEN))).toHaveLength(1)
    const stolen = await db.selectFrom('outbox').selectAll().where('to_email', '=', 'attacker@b.test').executeTakeFirstOrThrow()
    expect(stolen.status).toBe('failed')
    expect(stolen.sealed_secret).toBeNull()
    await db.destroy()
  })

  it('a message given up drops its token; retrying it is refused (link_gone), unlike a message without a link', async () => {
    const db = await fresh()
    await enqueueMail(db, { ...linkMail(), secret: TOKEN })
    await enqueueMail(db, { kind: 'plain', to: { email: 'c@b.test' }, subject: 'Hello', html: '<p>hi</p>', text: 'hi' })
    await db.updateTable('outbox').set({ attempts: OUTBOX.maxAttempts - 1 }).execute()
    expect(await processOutbox(db, transport(true).t, 'from@x')).toEqual({ sent: 0, failed: 2 })
    const rows = await db.selectFrom('outbox').selectAll().orderBy('id').execute()
    expect(rows.map((r) => r.status)).toEqual(['failed', 'failed'])
    expect(rows[0]!.sealed_secret).toBeNull()
    expect(await retryMessage(db, rows[0]!.id)).toBe('link_gone')
    expect(await retryMessage(db, rows[1]!.id)).toBe('ok')
    await db.destroy()
  })

  it('the upgrade takes confirmation tokens out of existing outbox rows (sealed while queued, gone once sent)', async () => {
    const db = openDatabase(':memory:')
    const before = Object.fromEntries(Object.entries(migrations).filter(([k]) => k < '0013'))
    await migrateToLatest(db, before)
    const raw = db as unknown as { insertInto: (t: string) => { values: (v: Record<string, unknown>) => { execute: () => Promise<unknown> } } }
    const body = (t: string) => ({ html: `<a href="http://x/verify-email?token=${t}">x</a>`, text: `http://x/verify-email?token=${t}` })
    await raw.insertInto('outbox').values({ message_id: '<q@x>', kind: 'confirm-email', to_email: 'q@b.test', subject: 'Confirm', ...body('queuedTokenAAAAAAAAAAAAAAAAAAAAAA'), next_attempt_at: '2026-01-01T00:00:00Z', status: 'queued' }).execute()
    await raw.insertInto('outbox').values({ message_id: '<s@x>', kind: 'confirm-email', to_email: 's@b.test', subject: 'Confirm', ...body('sentTokenBBBBBBBBBBBBBBBBBBBBBBBBB'), next_attempt_at: '2026-01-01T00:00:00Z', status: 'sent' }).execute()
    await migrateToLatest(db)
    const rows = await db.selectFrom('outbox').selectAll().orderBy('id').execute()
    expect(JSON.stringify(rows)).not.toMatch(/queuedToken|sentToken/)
    expect(unseal(rows[0]!.sealed_secret!, secretContext('<q@x>'))).toBe('queuedTokenAAAAAAAAAAAAAAAAAAAAAA')
    expect(rows[0]!.text).toBe(`http://x/verify-email?token=${SECRET_TOKEN}`)
    expect(rows[1]!.sealed_secret).toBeNull()
    // Sealed for one message, it does not open as another's.
    expect(() => unseal(seal('x', secretContext('<q@x>')), secretContext('<s@x>'))).toThrow()
    await db.destroy()
  })
})
