import { inflateSync } from 'node:zlib'
import { addDecoder, BaseDecoder, fromArrayBuffer, getDecoder } from 'geotiff'

/** A raster that cannot be used: the message says why, for a 400. */
export class RasterError extends Error {}

/** The most cells (rows × columns × bands) an uploaded raster may have: about 100 MB of float32. */
export const MAX_GRID_CELLS = 25_000_000

/**
 * Compression schemes an upload may use (TIFF 6.0 tag 259): none, LZW, Deflate (both codes) and
 * PackBits. Each is decoded with its output bounded by the block's declared size, so a small file
 * that inflates to gigabytes (a decompression bomb) is refused after at most that many bytes.
 * JPEG, LERC, Zstandard and WebP are refused: lossy or not needed for cloud grids and height models.
 */
const COMPRESSIONS = new Map<number, string>([[1, 'none'], [5, 'LZW'], [8, 'Deflate'], [32946, 'Deflate'], [32773, 'PackBits']])

interface BlockParams { tileWidth: number; tileHeight: number; bitsPerSample: number | ArrayLike<number>; planarConfiguration: number }

/** Bytes one strip or tile decodes to: its declared width × height × bytes per pixel (per band when planar). */
function blockBytes(p: BlockParams): number {
  const bits = typeof p.bitsPerSample === 'number' ? [p.bitsPerSample] : Array.from(p.bitsPerSample)
  const bitsPerPixel = p.planarConfiguration === 2 ? bits[0]! : bits.reduce((a, b) => a + b, 0)
  return Math.ceil((p.tileWidth * bitsPerPixel) / 8) * p.tileHeight
}

const bomb = (scheme: string, limit: number) => new RasterError(`A ${scheme}-compressed strip or tile inflates beyond its declared size of ${limit.toLocaleString('en')} bytes: the file is refused (corrupt, or a decompression bomb)`)

/** Deflate through zlib, which stops as soon as the output passes the block's declared size. */
class BoundedDeflate extends BaseDecoder {
  override decodeBlock(buffer: ArrayBuffer): ArrayBuffer {
    const limit = blockBytes(this.parameters as unknown as BlockParams)
    let out: Buffer
    try {
      out = inflateSync(new Uint8Array(buffer), { maxOutputLength: Math.max(1, limit) })
    } catch (e) {
      if ((e as { code?: string }).code === 'ERR_BUFFER_TOO_LARGE') throw bomb('Deflate', limit)
      throw new RasterError('A Deflate-compressed strip or tile is corrupt')
    }
    return out.buffer.slice(out.byteOffset, out.byteOffset + out.byteLength) as ArrayBuffer
  }
}

/** PackBits (TIFF 6.0 section 9) into a buffer of the declared size; a run past its end is refused. */
class BoundedPackBits extends BaseDecoder {
  override decodeBlock(buffer: ArrayBuffer): ArrayBuffer {
    const limit = blockBytes(this.parameters as unknown as BlockParams)
    const src = new Uint8Array(buffer)
    const out = new Uint8Array(limit)
    let o = 0
    for (let i = 0; i < src.length;) {
      const h = (src[i++]! << 24) >> 24 // signed byte
      if (h === -128) continue
      const n = h < 0 ? 1 - h : h + 1
      if (o + n > limit) throw bomb('PackBits', limit)
      if (h < 0) out.fill(src[i++] ?? 0, o, o + n)
      else { out.set(src.subarray(i, i + n), o); i += n }
      o += n
    }
    return out.buffer
  }
}

/**
 * How many bytes an LZW block decodes to, counted without decoding it (only each code's string
 * length is kept), stopping as soon as the count passes `limit`. Follows the TIFF 6.0 variant (MSB
 * first, 9–12-bit codes, code width raised one code early) as geotiff's own decoder reads it.
 */
export function lzwDecodedLength(src: Uint8Array, limit: number): number {
  const CLEAR = 256
  const EOI = 257
  const len = new Uint32Array(4097)
  len.fill(1, 0, 256)
  let dict = 258
  let width = 9
  let pos = 0
  let out = 0
  let old = -1
  const next = () => {
    if (pos >> 3 >= src.length) return EOI
    let c = 0
    for (let k = 0; k < width; k++, pos++) c = (c << 1) | (((src[pos >> 3] ?? 0) >> (7 - (pos & 7))) & 1)
    return c
  }
  for (let code = next(); code !== EOI; code = next()) {
    if (code === CLEAR) {
      dict = 258
      width = 9
      do code = next(); while (code === CLEAR)
      if (code === EOI) break
      if (code > CLEAR) throw new RasterError('An LZW-compressed strip or tile is corrupt')
      out += 1
      old = code
    } else if (code < dict) {
      out += len[code]!
      if (old >= 0 && dict < 4097) len[dict++] = len[old]! + 1
      old = code
    } else {
      if (old < 0) throw new RasterError('An LZW-compressed strip or tile is corrupt')
      const l = len[old]! + 1
      out += l
      if (dict < 4097) len[dict++] = l
      old = code
    }
    if (out > limit) return out
    if (dict + 1 >= 2 ** width) {
      if (width === 12) old = -1
      else width++
    }
  }
  return out
}

let decodersReady: Promise<void> | undefined
/** Replaces geotiff's unbounded decoders with the bounded ones above (once per process). */
function boundedDecoders(): Promise<void> {
  decodersReady ??= (async () => {
    // geotiff's own LZW decoder does the decoding, once the count above has shown the block fits.
    const lzw = await getDecoder(5, { tileWidth: 1, tileHeight: 1, predictor: 1, bitsPerSample: 8, planarConfiguration: 1 })
    class BoundedLzw extends BaseDecoder {
      override decodeBlock(buffer: ArrayBuffer) {
        const limit = blockBytes(this.parameters as unknown as BlockParams)
        if (lzwDecodedLength(new Uint8Array(buffer), limit) > limit) throw bomb('LZW', limit)
        return lzw.decodeBlock(buffer)
      }
    }
    addDecoder([8, 32946], async () => BoundedDeflate, undefined, false)
    addDecoder(32773, async () => BoundedPackBits, undefined, false)
    addDecoder(5, async () => BoundedLzw, undefined, false)
  })()
  return decodersReady
}

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
  await boundedDecoders()
  const image = await tiff.getImage()
  const compression = Number(image.getFileDirectory().getValue('Compression') ?? 1)
  if (!COMPRESSIONS.has(compression)) throw new RasterError(`Unsupported compression (TIFF code ${compression}): use none, LZW, Deflate or PackBits`)
  const keys = image.getGeoKeys() ?? {}
  if (keys.ProjectedCSTypeGeoKey || (keys.GTModelTypeGeoKey && keys.GTModelTypeGeoKey !== 2)) {
    throw new RasterError(`Wrong CRS: the grid must be geographic latitude/longitude (EPSG:4326), this one is projected (EPSG:${keys.ProjectedCSTypeGeoKey ?? '?'})`)
  }
  if (keys.GeographicTypeGeoKey && keys.GeographicTypeGeoKey !== 4326) {
    throw new RasterError(`Wrong CRS: expected EPSG:4326, found EPSG:${keys.GeographicTypeGeoKey}`)
  }
  // ModelTransformationTag (GeoTIFF 1.1, tag 34264): a rotated or sheared grid.
  if (image.getFileDirectory().hasTag(34264)) throw new RasterError('Rotated or sheared grids are not supported: use a regular latitude/longitude grid')
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
