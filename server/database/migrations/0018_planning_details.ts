import type { Kysely } from 'kysely'

// Reserved: filled in by the work it is named after.
export async function up(_db: Kysely<unknown>): Promise<void> {}

export async function down(_db: Kysely<unknown>): Promise<void> {}
