import type { Kysely } from 'kysely'
import type { Database, Role } from '../schema'

/**
 * The invented demo scenario (demo data only): Kestrel Sky Journeys, a small company planning
 * trips to the 2027-08-02 total eclipse. Idempotent: every insert is keyed on a natural key.
 */
export const DEMO_PASSWORD = 'eclipse-demo'
export const DEMO_ACCOUNTS: Array<{ email: string; name: string; role: Role }> = [
  { email: 'organiser@umbrafield.test', name: 'Ines Marlow (demo organiser)', role: 'organiser' },
  { email: 'guide@umbrafield.test', name: 'Tomas Reyland (demo guide)', role: 'guide' },
  { email: 'traveller@umbrafield.test', name: 'Aiko Brennan (demo traveller)', role: 'traveller' },
  { email: 'traveller2@umbrafield.test', name: 'Samir Okafor (demo traveller)', role: 'traveller' },
]

export async function seedDemo(db: Kysely<Database>): Promise<void> {
  const hash = await hashPassword(DEMO_PASSWORD)
  await db.transaction().execute(async (trx) => {
    for (const a of DEMO_ACCOUNTS) {
      await trx.insertInto('users').values({ email: a.email, name: a.name, role: a.role, password_hash: hash })
        .onConflict((oc) => oc.column('email').doNothing()).execute()
    }
  })
}
