import { brotliDecompressSync, gunzipSync } from 'node:zlib'
import { describe, expect, it } from 'vitest'
import { compressJson, pickEncoding } from '../../server/utils/compressJson'

describe('Accept-Encoding for JSON answers', () => {
  it('prefers brotli, falls back to gzip, honours q=0 and *', () => {
    expect(pickEncoding(undefined)).toBeNull()
    expect(pickEncoding('')).toBeNull()
    expect(pickEncoding('identity')).toBeNull()
    expect(pickEncoding('gzip, deflate, br')).toBe('br')
    expect(pickEncoding('gzip')).toBe('gzip')
    expect(pickEncoding('br;q=0, gzip')).toBe('gzip')
    expect(pickEncoding('br;q=0.2, gzip;q=0.8')).toBe('gzip')
    expect(pickEncoding('BR')).toBe('br')
    expect(pickEncoding('*')).toBe('br')
    expect(pickEncoding('*;q=0')).toBeNull()
    expect(pickEncoding('gzip;q=0, deflate')).toBeNull()
  })

  it('compresses to bytes that decode to the same text', async () => {
    const text = JSON.stringify({ rows: Array.from({ length: 200 }, (_, i) => ({ id: i, name: `Site ${i}`, lat: 25 + i / 100 })) })
    const br = await compressJson(text, 'br')
    const gz = await compressJson(text, 'gzip')
    expect(br.length).toBeLessThan(text.length / 3)
    expect(gz.length).toBeLessThan(text.length / 3)
    expect(brotliDecompressSync(br).toString('utf8')).toBe(text)
    expect(gunzipSync(gz).toString('utf8')).toBe(text)
  })
})
