import { IdParams } from '#shared/schemas/auth'
import { TerrainUploadFields } from '#shared/schemas/bestGround'
import { RasterError } from '../../../../services/geotiff'
import { getWorkspace } from '../../../../services/planning'
import { MAX_TERRAIN_BYTES, parseTerrainTiff, storeTerrain } from '../../../../services/terrain'

/** Upload a terrain (height) model: a GeoTIFF in EPSG:4326, metres. All or nothing. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const db = useDb()
  await withServiceErrors(() => getWorkspace(db, id))
  const tooLarge = () => createError({ statusCode: 413, statusMessage: 'Too large', message: `Files are limited to ${MAX_TERRAIN_BYTES / 1024 / 1024} MB` })
  if (Number(getRequestHeader(event, 'content-length') ?? 0) > MAX_TERRAIN_BYTES + 64 * 1024) throw tooLarge()
  const parts = (await readMultipartFormData(event)) ?? []
  const file = parts.find((p) => p.name === 'file' && p.filename)
  if (!file) throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: 'Attach the GeoTIFF in the "file" field', data: { fields: { file: 'required' } } })
  if (file.data.length > MAX_TERRAIN_BYTES) throw tooLarge()
  const fields = parseOr400(TerrainUploadFields, { name: parts.find((p) => p.name === 'name' && !p.filename)?.data.toString('utf8') || file.filename }, 'form')
  try {
    const model = await parseTerrainTiff(file.data)
    const terrainId = await storeTerrain(db, user, id, fields.name, model)
    setResponseStatus(event, 201)
    return { id: terrainId, name: fields.name, cells: model.nlat * model.nlon, minM: model.minM, maxM: model.maxM }
  } catch (e) {
    if (e instanceof RasterError) throw createError({ statusCode: 400, statusMessage: 'Invalid file', message: e.message, data: { fields: { file: e.message } } })
    throw e
  }
})
