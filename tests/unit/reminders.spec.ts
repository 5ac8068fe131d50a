import { describe, expect, it } from 'vitest'
import { migrateToLatest, openDatabase } from '../../server/database/connection'
import { queueBalanceReminders } from '../../server/services/bookingMail'

async function world(balanceDue: string) {
  const db = openDatabase(':memory:')
  await migrateToLatest(db)
  const u = await db.insertInto('users').values({ email: 'a@b.test', name: 'A', password_hash: 'x', role: 'traveller' }).returning('id').executeTakeFirstOrThrow()
  const w = await db.insertInto('workspaces').values({ eclipse_id: '2027-08-02', name: 'W', created_by: u.id }).returning('id').executeTakeFirstOrThrow()
  const s = await db.insertInto('sites').values({ workspace_id: w.id, name: 'S', lat: 25.7, lon: 32.6 }).returning('id').executeTakeFirstOrThrow()
  const t = await db.insertInto('trips').values({
    workspace_id: w.id, eclipse_id: '2027-08-02', primary_site_id: s.id, title: 'T', start_date: '2027-07-30', end_date: '2027-08-05',
    meeting_name: 'M', meeting_lat: 25.7, meeting_lon: 32.6, meeting_time_utc: '2027-08-02T03:30:00Z', seats: 10, price_minor: 1000, deposit_minor: 200,
    currency: 'eur', balance_due_date: balanceDue, created_by: u.id, status: 'published',
  }).returning('id').executeTakeFirstOrThrow()
  await db.insertInto('bookings').values({ trip_id: t.id, user_id: u.id, seats: 1, status: 'confirmed', hold_expires_at: null, price_minor: 1000, deposit_minor: 200, paid_minor: 200, currency: 'eur' }).execute()
  return db
}

describe('balance reminders (scheduled)', () => {
  it.each([
    ['2027-05-01', '2027-03-01', 0, 'more than 30 days ahead: none yet'],
    ['2027-05-01', '2027-04-05', 1, '26 days ahead: the 30-day reminder'],
    ['2027-05-01', '2027-04-26', 1, '5 days ahead: the 7-day reminder'],
    ['2027-05-01', '2027-05-03', 0, 'past the due date: none'],
  ])('due %s, today %s → %i (%s)', async (due, today, n) => {
    const db = await world(due)
    expect(await queueBalanceReminders(db, 'http://x', new Date(`${today}T09:00:00Z`))).toBe(n)
    // Running again the same day adds nothing: one reminder per booking and threshold.
    expect(await queueBalanceReminders(db, 'http://x', new Date(`${today}T10:00:00Z`))).toBe(0)
    await db.destroy()
  })
  it('sends the 30-day and the 7-day reminder once each over the weeks', async () => {
    const db = await world('2027-05-01')
    for (const day of ['2027-04-02', '2027-04-10', '2027-04-20', '2027-04-25', '2027-04-28', '2027-04-30']) await queueBalanceReminders(db, 'http://x', new Date(`${day}T09:00:00Z`))
    const rows = await db.selectFrom('outbox').select(['dedupe_key', 'subject']).execute()
    expect(rows.map((r) => r.dedupe_key).sort()).toEqual(['balance-30-1', 'balance-7-1'])
    expect(rows.find((r) => r.dedupe_key === 'balance-7-1')!.subject).toContain('7 days')
    await db.destroy()
  })
})
