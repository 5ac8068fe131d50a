// npm run keys:rotate [-- --check] — re-seals every sealed value (participants' passport numbers,
// dates of birth, phones and notes; two-factor secrets; one-time links waiting in the outbox) under
// the current data key, on DATABASE_URL (postgres://…) when set, otherwise on the SQLite file
// NUXT_DB_PATH (default data/umbrafield.sqlite).
//
// Run it with the app's own key settings: NUXT_DATA_KEY + NUXT_DATA_KEY_ID (the new key) and
// NUXT_DATA_KEYS_PREVIOUS ("id:key,…", the keys that still open old values); NUXT_SESSION_PASSWORD
// too when values sealed without a data key (id "s1") may remain. On the demo's SQLite file, unset
// settings are read from the files the demo keeps beside it (.session-secret, .data-key).
// Safe while the app runs; an interrupted run resumes when run again. `--check` writes nothing:
// it opens every value and counts them per key. Exit status 1 when any value did not open.
import { existsSync, readFileSync } from 'node:fs'
import { dirname, join, resolve } from 'node:path'
import { openDatabase } from '../server/database/connection'
import { isPostgresUrl } from '../server/database/dialect'
import { rotateSealedValues } from '../server/services/personalData/rotate'

const target = isPostgresUrl(process.env.DATABASE_URL) ? process.env.DATABASE_URL : process.env.NUXT_DB_PATH || 'data/umbrafield.sqlite'
const shown = isPostgresUrl(target) ? target.replace(/\/\/[^@/]*@/, '//') : target
if (!isPostgresUrl(target)) {
  const dir = dirname(resolve(target))
  for (const [name, file] of [['NUXT_SESSION_PASSWORD', '.session-secret'], ['NUXT_DATA_KEY', '.data-key']] as const) {
    if (!process.env[name] && existsSync(join(dir, file))) process.env[name] = readFileSync(join(dir, file), 'utf8').trim()
  }
}
const checkOnly = process.argv.includes('--check')
const db = openDatabase(target)
try {
  const r = await rotateSealedValues(db, { checkOnly })
  console.log(`${checkOnly ? 'checked' : 'rotated'} ${shown}: current key "${r.currentKeyId}"`)
  for (const c of r.columns) {
    const keys = Object.entries(c.byKey).map(([k, n]) => `${k}: ${n}`).join(', ') || 'none'
    console.log(`  ${c.column.padEnd(36)} ${String(c.values).padStart(6)} values (${keys}); ${checkOnly ? 'would re-seal' : 're-sealed'} ${c.values - (c.byKey[r.currentKeyId] ?? 0) - c.failed}${checkOnly ? '' : ` → ${c.rotated}`}; did not open ${c.failed}`)
  }
  console.log(`total: ${r.totals.values} values, ${r.totals.alreadyCurrent} already under "${r.currentKeyId}", ${r.totals.rotated} re-sealed, ${r.totals.failed} did not open`)
  for (const f of r.failures) console.error(`  did not open: ${f}`)
  console.log(JSON.stringify({ currentKeyId: r.currentKeyId, checkOnly, ...r.totals }))
  if (r.totals.failed) process.exitCode = 1
} catch (e) {
  console.error((e as Error).message)
  process.exitCode = 1
} finally {
  await db.destroy()
}
