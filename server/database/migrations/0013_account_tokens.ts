import { sql, type Kysely } from 'kysely'
import { nowIsoDefault } from '../dialect'
import { seal } from '../../services/sealed'
import { SECRET_TOKEN, secretContext } from '../../services/outbox'

/**
 * One-time links that set a password (a reset, or an invitation's first password), stored only as
 * the SHA-256 of their token; and a sealed column on the outbox, so a queued message that carries
 * such a link holds its token sealed (AES-256-GCM) rather than in its bodies.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.createTable('account_tokens')
    .addColumn('token_hash', 'text', (c) => c.primaryKey())
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('purpose', 'text', (c) => c.notNull().check(sql`purpose in ('reset','invite')`))
    .addColumn('expires_at', 'text', (c) => c.notNull())
    // Spent, or superseded by a newer link: either way it opens nothing any more.
    .addColumn('used_at', 'text')
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .execute()
  await db.schema.createIndex('account_tokens_user').on('account_tokens').column('user_id').execute()
  await db.schema.alterTable('outbox').addColumn('sealed_secret', 'text').execute()

  // Confirmation links already in the outbox carried their token in clear: take it out of the
  // bodies; a message still to be sent keeps it sealed, one already sent keeps nothing.
  const raw = db as unknown as Kysely<Record<string, Record<string, string | null>>>
  const rows = await raw.selectFrom('outbox').select(['id', 'message_id', 'status', 'html', 'text'])
    .where('text', 'like', '%verify-email?token=%').execute()
  for (const r of rows) {
    const token = /verify-email\?token=([A-Za-z0-9_-]+)/.exec(String(r.text))?.[1]
    if (!token) continue
    const scrub = (s: string | null) => String(s).split(token).join(SECRET_TOKEN)
    const pending = r.status === 'queued' || r.status === 'sending'
    let sealed: string | null = null
    let status = String(r.status)
    let lastError: string | null | undefined
    if (pending) {
      try { sealed = seal(token, secretContext(String(r.message_id))) } catch {
        status = 'failed'
        lastError = 'The confirmation link could not be kept sealed: the person can ask for a new one'
      }
    }
    await raw.updateTable('outbox').set({ html: scrub(r.html), text: scrub(r.text), sealed_secret: sealed, status, ...(lastError ? { last_error: lastError } : {}) })
      .where('id', '=', r.id as string).execute()
  }
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('outbox').dropColumn('sealed_secret').execute()
  await db.schema.dropTable('account_tokens').execute()
}
