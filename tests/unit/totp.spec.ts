import { describe, expect, it } from 'vitest'
import { base32Decode, base32Encode, matchStep, totpCode } from '../../server/services/totp'

const ascii = (s: string) => new TextEncoder().encode(s)

// RFC 6238 (TOTP), Appendix B "Test Vectors": T0 = 0, X = 30 s, 8 digits, with the ASCII seeds
// "12345678901234567890" (SHA-1, 20 bytes), that seed repeated to 32 bytes (SHA-256) and to 64 bytes
// (SHA-512). Source: RFC 6238 (IETF, May 2011), Appendix B table; the values below were compared with a
// verbatim copy of that table kept in a public repository's test code.
const VECTORS: [number, string, string, string][] = [
  // Unix time, SHA-1, SHA-256, SHA-512
  [59, '94287082', '46119246', '90693936'],
  [1111111109, '07081804', '68084774', '25091201'],
  [1111111111, '14050471', '67062674', '99943326'],
  [1234567890, '89005924', '91819424', '93441116'],
  [2000000000, '69279037', '90698825', '38618901'],
  [20000000000, '65353130', '77737706', '47863826'],
]
const SEED_SHA1 = ascii('12345678901234567890')
const SEED_SHA256 = ascii('12345678901234567890123456789012')
const SEED_SHA512 = ascii('1234567890123456789012345678901234567890123456789012345678901234')

describe('TOTP (RFC 6238 Appendix B)', () => {
  it.each(VECTORS)('at %i s gives the published 8-digit values', (t, sha1, sha256, sha512) => {
    expect(totpCode(SEED_SHA1, t * 1000, { digits: 8 })).toBe(sha1)
    expect(totpCode(SEED_SHA256, t * 1000, { digits: 8, algorithm: 'sha256' })).toBe(sha256)
    expect(totpCode(SEED_SHA512, t * 1000, { digits: 8, algorithm: 'sha512' })).toBe(sha512)
  })

  it.each(VECTORS)('at %i s the 6-digit code the app uses is the same value truncated (mod 10^6)', (t, sha1) => {
    expect(totpCode(SEED_SHA1, t * 1000)).toBe(sha1.slice(2))
  })

  // The Base32 form of the SHA-1 seed, as an authenticator app would be given it (RFC 4648 §6).
  const B32 = 'GEZDGNBVGY3TQOJQGEZDGNBVGY3TQOJQ'
  const sixDigits = (t: number) => VECTORS.find((v) => v[0] === t)![1].slice(2)

  it('Base32 round-trips (RFC 4648 §10 "foobar" vectors, unpadded)', () => {
    // RFC 4648 §10: BASE32("f") = "MY======", BASE32("foobar") = "MZXW6YTBOI======".
    expect(base32Encode(ascii('f'))).toBe('MY')
    expect(base32Encode(ascii('foobar'))).toBe('MZXW6YTBOI')
    expect(base32Encode(SEED_SHA1)).toBe(B32)
    expect(base32Decode('MZXW6YTBOI======').toString()).toBe('foobar')
    expect(Buffer.from(base32Decode(B32)).equals(Buffer.from(SEED_SHA1))).toBe(true)
  })

  it('accepts a code in its own step and one step either side, not two', () => {
    const t = 1111111111 // step 37037037 (1111111110 … 1111111139 s)
    const code = sixDigits(t)
    expect(matchStep(B32, code, t * 1000, null)).toBe(37037037)
    expect(matchStep(B32, code, (t + 30) * 1000, null)).toBe(37037037)
    expect(matchStep(B32, code, (t - 30) * 1000, null)).toBe(37037037)
    expect(matchStep(B32, code, (t + 60) * 1000, null)).toBeNull()
    expect(matchStep(B32, code, (t - 60) * 1000, null)).toBeNull()
  })

  it('refuses a step already used, and anything that is not 6 digits', () => {
    const t = 1234567890
    expect(matchStep(B32, sixDigits(t), t * 1000, Math.floor(t / 30))).toBeNull()
    expect(matchStep(B32, sixDigits(t), t * 1000, Math.floor(t / 30) - 1)).toBe(Math.floor(t / 30))
    expect(matchStep(B32, '12345', t * 1000, null)).toBeNull()
    expect(matchStep(B32, 'abcdef', t * 1000, null)).toBeNull()
  })
})
