import { ClimatologyUploadFields } from '#shared/schemas/climatology'
import { ClimatologyError, MAX_CLIMATOLOGY_BYTES, parseCsvGrid, parseGeoTiff, storeDataset } from '../../services/climatology'

/** Upload a gridded monthly cloud climatology (GeoTIFF or CSV grid). All or nothing: a bad file stores nothing. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const size = Number(getRequestHeader(event, 'content-length') ?? 0)
  if (size > MAX_CLIMATOLOGY_BYTES + 64 * 1024) throw createError({ statusCode: 413, statusMessage: 'Too large', message: `Files are limited to ${MAX_CLIMATOLOGY_BYTES / 1024 / 1024} MB` })
  const parts = (await readMultipartFormData(event)) ?? []
  const text = (name: string) => parts.find((p) => p.name === name && !p.filename)?.data.toString('utf8')
  const fields = parseOr400(ClimatologyUploadFields, {
    name: text('name'), source: text('source'), licence: text('licence'), years: text('years'), timeOfDay: text('timeOfDay'), month: text('month') || undefined,
  }, 'form')
  const file = parts.find((p) => p.name === 'file' && p.filename)
  if (!file) throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: 'Attach the grid file in the "file" field', data: { fields: { file: 'required' } } })
  if (file.data.length > MAX_CLIMATOLOGY_BYTES) throw createError({ statusCode: 413, statusMessage: 'Too large', message: `Files are limited to ${MAX_CLIMATOLOGY_BYTES / 1024 / 1024} MB` })
  try {
    const isTiff = /\.tiff?$/i.test(file.filename ?? '') || file.data.subarray(0, 2).toString('latin1') === 'II' || file.data.subarray(0, 2).toString('latin1') === 'MM'
    const grid = isTiff ? await parseGeoTiff(file.data, fields.month) : parseCsvGrid(file.data.toString('utf8'))
    const id = await storeDataset(useDb(), user, fields, grid)
    setResponseStatus(event, 201)
    return { id, months: [...grid.months.keys()].sort((a, b) => a - b) }
  } catch (e) {
    if (e instanceof ClimatologyError) throw createError({ statusCode: 400, statusMessage: 'Invalid file', message: e.message })
    throw e
  }
})
