import { createCipheriv, createDecipheriv, hkdfSync, randomBytes } from 'node:crypto'

/**
 * Secrets and personal data at rest: AES-256-GCM (NIST SP 800-38D) with a 96-bit random IV and a
 * 128-bit tag. A sealed value names the key that sealed it, so keys can be rotated:
 *
 *   uf1.<keyId>.<iv>.<tag>.<ciphertext>   (base64url parts)
 *
 * `context` is bound in as additional authenticated data (e.g. "totp:12"), so a sealed value
 * copied into another row or column does not open.
 *
 * Keys:
 * - NUXT_DATA_KEY: 32 bytes as base64 or 64 hex digits; its id is NUXT_DATA_KEY_ID (default "k1").
 * - NUXT_DATA_KEYS_PREVIOUS: earlier keys that may still open old values, "id:key,id:key".
 * - Without NUXT_DATA_KEY (development, the demo, tests) the key is derived from
 *   NUXT_SESSION_PASSWORD with HKDF-SHA256 (RFC 5869), id "s1". Changing that secret then makes
 *   sealed values unreadable, which is why production sets NUXT_DATA_KEY.
 */

const PREFIX = 'uf1'
const SESSION_KEY_ID = 's1'

export class SealError extends Error {}

function parseKey(text: string, name: string): Buffer {
  const t = text.trim()
  const key = /^[0-9a-f]{64}$/i.test(t) ? Buffer.from(t, 'hex') : Buffer.from(t, 'base64')
  if (key.length !== 32) throw new SealError(`${name} must be 32 bytes (base64 or 64 hex digits)`)
  return key
}

/** The key ring: the current key (used to seal) and every key that may open. */
export function keyRing(): { currentId: string; keys: Map<string, Buffer> } {
  const keys = new Map<string, Buffer>()
  for (const part of (process.env.NUXT_DATA_KEYS_PREVIOUS ?? '').split(',').map((s) => s.trim()).filter(Boolean)) {
    const i = part.indexOf(':')
    if (i < 1) throw new SealError('NUXT_DATA_KEYS_PREVIOUS must be "id:key,id:key"')
    keys.set(part.slice(0, i), parseKey(part.slice(i + 1), `NUXT_DATA_KEYS_PREVIOUS (${part.slice(0, i)})`))
  }
  const session = process.env.NUXT_SESSION_PASSWORD
  if (session && session.length >= 32) {
    keys.set(SESSION_KEY_ID, Buffer.from(hkdfSync('sha256', session, 'umbrafield', 'data key', 32)))
  }
  let currentId = SESSION_KEY_ID
  if (process.env.NUXT_DATA_KEY) {
    currentId = process.env.NUXT_DATA_KEY_ID || 'k1'
    if (!/^[A-Za-z0-9_-]{1,32}$/.test(currentId)) throw new SealError('NUXT_DATA_KEY_ID must be 1–32 letters, digits, _ or -')
    keys.set(currentId, parseKey(process.env.NUXT_DATA_KEY, 'NUXT_DATA_KEY'))
  }
  if (!keys.has(currentId)) throw new SealError('No data key: set NUXT_DATA_KEY (or NUXT_SESSION_PASSWORD in development)')
  return { currentId, keys }
}

/** Seals `plain` under the current key, bound to `context`. */
export function seal(plain: string, context: string): string {
  const { currentId, keys } = keyRing()
  const iv = randomBytes(12)
  const c = createCipheriv('aes-256-gcm', keys.get(currentId)!, iv)
  c.setAAD(Buffer.from(context, 'utf8'))
  const ct = Buffer.concat([c.update(plain, 'utf8'), c.final()])
  return [PREFIX, currentId, iv.toString('base64url'), c.getAuthTag().toString('base64url'), ct.toString('base64url')].join('.')
}

/** Opens a sealed value; throws SealError when it was sealed for another context, tampered with, or its key is gone. */
export function unseal(sealed: string, context: string): string {
  const parts = sealed.split('.')
  if (parts.length !== 5 || parts[0] !== PREFIX) throw new SealError('Not a sealed value')
  const [, keyId, iv, tag, ct] = parts as [string, string, string, string, string]
  const key = keyRing().keys.get(keyId)
  if (!key) throw new SealError(`The key "${keyId}" that sealed this value is not configured`)
  try {
    const d = createDecipheriv('aes-256-gcm', key, Buffer.from(iv, 'base64url'))
    d.setAAD(Buffer.from(context, 'utf8'))
    d.setAuthTag(Buffer.from(tag, 'base64url'))
    return Buffer.concat([d.update(Buffer.from(ct, 'base64url')), d.final()]).toString('utf8')
  } catch {
    throw new SealError('A sealed value did not open (wrong context, key or tampered)')
  }
}

/** The id of the key that sealed a value (for rotation), or null when it is not sealed. */
export function sealedKeyId(sealed: string): string | null {
  const parts = sealed.split('.')
  return parts.length === 5 && parts[0] === PREFIX ? parts[1]! : null
}
