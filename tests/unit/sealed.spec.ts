import { randomBytes } from 'node:crypto'
import { afterEach, describe, expect, it } from 'vitest'
import { seal, sealedKeyId, SealError, unseal } from '../../server/services/sealed'

const saved = { ...process.env }
afterEach(() => { process.env = { ...saved } })
const session = 'a-session-password-that-is-long-enough-0123456789'

describe('sealed values (AES-256-GCM)', () => {
  it('round-trips, never contains the plain text, and differs each time (random IV)', () => {
    process.env.NUXT_SESSION_PASSWORD = session
    delete process.env.NUXT_DATA_KEY
    const a = seal('P1234567', 'passport:1')
    const b = seal('P1234567', 'passport:1')
    expect(a).not.toBe(b)
    expect(a).not.toContain('P1234567')
    expect(unseal(a, 'passport:1')).toBe('P1234567')
    expect(sealedKeyId(a)).toBe('s1')
  })

  it('does not open in another context, or when tampered with', () => {
    process.env.NUXT_SESSION_PASSWORD = session
    const a = seal('secret', 'totp:1')
    expect(() => unseal(a, 'totp:2')).toThrow(SealError)
    const parts = a.split('.')
    const ct = Buffer.from(parts[4]!, 'base64url'); ct[0]! ^= 1
    parts[4] = ct.toString('base64url')
    expect(() => unseal(parts.join('.'), 'totp:1')).toThrow(SealError)
  })

  it('names its key; an old key still opens after rotation, a missing one does not', () => {
    const k1 = randomBytes(32).toString('base64')
    const k2 = randomBytes(32).toString('hex')
    process.env.NUXT_DATA_KEY = k1
    process.env.NUXT_DATA_KEY_ID = 'k1'
    const old = seal('+447700900123', 'phone:3')
    expect(sealedKeyId(old)).toBe('k1')
    process.env.NUXT_DATA_KEY = k2
    process.env.NUXT_DATA_KEY_ID = 'k2'
    process.env.NUXT_DATA_KEYS_PREVIOUS = `k1:${k1}`
    expect(unseal(old, 'phone:3')).toBe('+447700900123')
    expect(sealedKeyId(seal('x', 'c'))).toBe('k2')
    delete process.env.NUXT_DATA_KEYS_PREVIOUS
    expect(() => unseal(old, 'phone:3')).toThrow(/"k1".*not configured/)
  })

  it('refuses a key of the wrong length', () => {
    process.env.NUXT_DATA_KEY = randomBytes(16).toString('base64')
    expect(() => seal('x', 'c')).toThrow(/32 bytes/)
  })
})
