import { fromArrayBuffer } from 'geotiff'

/** A raster that cannot be used: the message says why, for a 400. */
export class RasterError extends Error {}

/** The most cells (rows × columns × bands) an uploaded raster may have: about 100 MB of float32. */
export const MAX_GRID_CELLS = 25_000_000

/**
 * Opens a GeoTIFF and checks it is a regular latitude/longitude grid in EPSG:4326 of at most
 * MAX_GRID_CELLS cells, before anything is decoded (a small compressed file can declare gigapixel
 * bands). Gives the cell-centre grid: `lat0`/`lon0` are the centre of the south-west cell when rows
 * are stored south to north.
 */
export async function openGeoTiff(buf: Buffer) {
  let tiff
  try {
    tiff = await fromArrayBuffer(buf.buffer.slice(buf.byteOffset, buf.byteOffset + buf.byteLength) as ArrayBuffer)
  } catch {
    throw new RasterError('This is not a readable GeoTIFF')
  }
  const image = await tiff.getImage()
  const keys = image.getGeoKeys() ?? {}
  if (keys.ProjectedCSTypeGeoKey || (keys.GTModelTypeGeoKey && keys.GTModelTypeGeoKey !== 2)) {
    throw new RasterError(`Wrong CRS: the grid must be geographic latitude/longitude (EPSG:4326), this one is projected (EPSG:${keys.ProjectedCSTypeGeoKey ?? '?'})`)
  }
  if (keys.GeographicTypeGeoKey && keys.GeographicTypeGeoKey !== 4326) {
    throw new RasterError(`Wrong CRS: expected EPSG:4326, found EPSG:${keys.GeographicTypeGeoKey}`)
  }
  const fd = image.getFileDirectory() as { ModelTransformation?: number[] }
  if (fd.ModelTransformation) throw new RasterError('Rotated or sheared grids are not supported: use a regular latitude/longitude grid')
  let origin: number[], res: number[]
  try {
    origin = image.getOrigin()
    res = image.getResolution()
  } catch {
    throw new RasterError('The GeoTIFF has no georeferencing (ModelTiepoint and ModelPixelScale)')
  }
  const width = image.getWidth()
  const height = image.getHeight()
  const bands = image.getSamplesPerPixel()
  if (width * height * bands > MAX_GRID_CELLS) throw new RasterError(`The raster is too large: ${width} × ${height} × ${bands} cells; at most ${MAX_GRID_CELLS.toLocaleString('en')} (a 0.1° grid of the whole Earth for 12 months is far less)`)
  // Pixel-is-area (the default): cell centres are half a pixel in from the tie point. Pixel-is-point
  // (GTRasterTypeGeoKey 2, as many height models are tagged): the tie point is the first centre.
  const pointRaster = keys.GTRasterTypeGeoKey === 2
  const dlon = res[0]!
  const dlatImage = res[1]! // negative for north-up images
  const lon0 = origin[0]! + (pointRaster ? 0 : dlon / 2)
  const firstRowLat = origin[1]! + (pointRaster ? 0 : dlatImage / 2)
  const northUp = dlatImage < 0
  const lat0 = northUp ? firstRowLat + dlatImage * (height - 1) : firstRowLat
  const dlat = Math.abs(dlatImage)
  if (lat0 < -90 || lat0 + dlat * (height - 1) > 90 || Math.abs(lon0) > 360) throw new RasterError('The grid lies outside latitude ±90°: check the CRS')
  return { image, width, height, bands, lat0, lon0, dlat, dlon, northUp, nodata: image.getGDALNoData() }
}
