import Papa from 'papaparse'
import { IdParams } from '#shared/schemas/auth'
import { REQUIRED_CSV_COLUMNS, validateSiteRows } from '#shared/schemas/sites'
import { importSites } from '../../../../services/planning'

const MAX_BYTES = 2 * 1024 * 1024

/** CSV import: every row is checked first; one bad row rejects the whole file and nothing is saved. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const parts = await readMultipartFormData(event)
  const file = parts?.find((p) => p.name === 'file')
  const reject = (errors: Array<{ row: number; field: string; message: string }>) => {
    setResponseStatus(event, 400)
    return { statusCode: 400, message: `The file was not imported: ${errors.length} problem${errors.length === 1 ? '' : 's'}`, errors }
  }
  if (!file) return reject([{ row: 0, field: 'file', message: 'Attach a CSV file in the "file" field' }])
  if (file.data.length > MAX_BYTES) return reject([{ row: 0, field: 'file', message: 'The file is larger than 2 MB' }])
  const parsed = Papa.parse<Record<string, string>>(file.data.toString('utf8').replace(/^\uFEFF/, ''), { header: true, skipEmptyLines: 'greedy' })
  const columns = (parsed.meta.fields ?? []).map((f) => f.trim().toLowerCase())
  const missing = REQUIRED_CSV_COLUMNS.filter((c) => !columns.includes(c))
  if (missing.length) return reject(missing.map((c) => ({ row: 1, field: c, message: `Missing column "${c}" (need name, lat, lon; optional elevation, notes)` })))
  const { rows, errors } = validateSiteRows(parsed.data)
  for (const e of parsed.errors) errors.push({ row: (e.row ?? 0) + 2, field: 'row', message: e.message })
  if (errors.length) return reject(errors.sort((a, b) => a.row - b.row))
  const created = await withServiceErrors(() => importSites(useDb(), user, id, rows))
  setResponseStatus(event, 201)
  return { created }
})
