import type { Kysely } from 'kysely'
import type { Database } from '../../database/schema'
import { keyRing, seal, sealedKeyId, unseal } from '../sealed'
import { SEALED_COLUMNS, SEALED_SETTINGS, type SealedColumn } from './sealedColumns'

export interface ColumnReport {
  column: string
  /** Non-null values seen. */
  values: number
  /** Values found under each key id, before this run changed them. */
  byKey: Record<string, number>
  /** Values re-sealed under the current key by this run. */
  rotated: number
  /** Values that did not open (their key is not configured, or they were tampered with); left as they are. */
  failed: number
}

export interface RotationReport {
  currentKeyId: string
  /** True for a check (nothing written). */
  checkOnly: boolean
  columns: ColumnReport[]
  totals: { values: number; rotated: number; alreadyCurrent: number; failed: number }
  /** Where the failed values are (table.column#key), at most 50. */
  failures: string[]
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any
type AnyDb = Kysely<any>

/**
 * Re-seals every sealed value in the database under the current data key (NUXT_DATA_KEY /
 * NUXT_DATA_KEY_ID), column by column from the registry, in pages of `batch` rows, each page one
 * transaction. A value is written back only if it is still what was read (a conditional update), so
 * the app may keep running meanwhile; a value already under the current key is left alone, so an
 * interrupted run is resumed by running it again. Works the same on SQLite and PostgreSQL.
 * With `checkOnly`, every value is opened and counted but nothing is written.
 */
export async function rotateSealedValues(db: Kysely<Database>, opts: { checkOnly?: boolean; batch?: number; columns?: readonly SealedColumn[] } = {}): Promise<RotationReport> {
  const { currentId } = keyRing()
  const batch = opts.batch ?? 200
  const any = db as unknown as AnyDb
  const report: RotationReport = { currentKeyId: currentId, checkOnly: !!opts.checkOnly, columns: [], totals: { values: 0, rotated: 0, alreadyCurrent: 0, failed: 0 }, failures: [] }
  for (const col of opts.columns ?? SEALED_COLUMNS) {
    const r: ColumnReport = { column: `${col.table}.${col.column}`, values: 0, byKey: {}, rotated: 0, failed: 0 }
    let after: number | null = null
    for (;;) {
      const last: number | null = after
      const rows: Array<Record<string, unknown>> = await any.selectFrom(col.table).select([col.key, col.column, ...col.reads])
        .where(col.column, 'is not', null)
        .$if(last !== null, (q) => q.where(col.key, '>', last))
        .orderBy(col.key).limit(batch).execute()
      if (!rows.length) break
      after = Number(rows.at(-1)![col.key])
      const writes: Array<{ key: unknown; from: string; to: string }> = []
      for (const row of rows) {
        const value = String(row[col.column])
        const keyId = sealedKeyId(value) ?? '(not sealed)'
        r.values++
        r.byKey[keyId] = (r.byKey[keyId] ?? 0) + 1
        let plain: string
        try {
          plain = unseal(value, col.context(row))
        } catch (e) {
          r.failed++
          if (report.failures.length < 50) report.failures.push(`${r.column}#${String(row[col.key])}: ${(e as Error).message}`)
          continue
        }
        if (keyId === currentId) continue
        if (!opts.checkOnly) writes.push({ key: row[col.key], from: value, to: seal(plain, col.context(row)) })
      }
      if (writes.length) {
        await any.transaction().execute(async (trx) => {
          for (const w of writes) {
            const u = await trx.updateTable(col.table).set({ [col.column]: w.to }).where(col.key, '=', w.key).where(col.column, '=', w.from).executeTakeFirst()
            r.rotated += Number(u.numUpdatedRows)
          }
        })
      }
    }
    report.columns.push(r)
    report.totals.values += r.values
    report.totals.rotated += r.rotated
    report.totals.failed += r.failed
    report.totals.alreadyCurrent += r.byKey[currentId] ?? 0
  }
  // Sealed values inside app settings' JSON (e.g. the web-push private key), one conditional update each.
  for (const st of opts.columns ? [] : SEALED_SETTINGS) {
    const r: ColumnReport = { column: `app_settings:${st.key}.${st.field}`, values: 0, byKey: {}, rotated: 0, failed: 0 }
    const row = await db.selectFrom('app_settings').select('value').where('key', '=', st.key).executeTakeFirst()
    const parsed = row ? (JSON.parse(row.value) as Record<string, unknown>) : null
    const value = parsed && typeof parsed[st.field] === 'string' ? (parsed[st.field] as string) : null
    if (row && parsed && value) {
      const keyId = sealedKeyId(value) ?? '(not sealed)'
      r.values++
      r.byKey[keyId] = 1
      try {
        const plain = unseal(value, st.context)
        if (keyId !== currentId && !opts.checkOnly) {
          const next = JSON.stringify({ ...parsed, [st.field]: seal(plain, st.context) })
          const u = await db.updateTable('app_settings').set({ value: next }).where('key', '=', st.key).where('value', '=', row.value).executeTakeFirst()
          r.rotated += Number(u.numUpdatedRows)
        }
      } catch (e) {
        r.failed++
        report.failures.push(`${r.column}: ${(e as Error).message}`)
      }
    }
    report.columns.push(r)
    report.totals.values += r.values
    report.totals.rotated += r.rotated
    report.totals.failed += r.failed
    report.totals.alreadyCurrent += r.byKey[currentId] ?? 0
  }
  return report
}
