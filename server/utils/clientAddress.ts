import { BlockList, isIP } from 'node:net'

/**
 * Client addresses, for throttles and sign-in backoff. Pure functions (no request object), so that
 * the parsing can be tested on its own.
 */

/** The eight 16-bit groups of an IPv6 address (a valid one: check with isIP first). */
function ipv6Groups(address: string): number[] {
  let a = address
  // A dotted IPv4 tail (::ffff:192.0.2.1) is the last two groups.
  const v4 = /(\d{1,3})\.(\d{1,3})\.(\d{1,3})\.(\d{1,3})$/.exec(a)
  if (v4) {
    const [o1, o2, o3, o4] = v4.slice(1).map(Number) as [number, number, number, number]
    a = `${a.slice(0, v4.index)}${((o1 << 8) | o2).toString(16)}:${((o3 << 8) | o4).toString(16)}`
  }
  const [head, tail] = a.split('::') as [string, string | undefined]
  const parse = (s: string | undefined) => (s ? s.split(':').map((h) => parseInt(h, 16)) : [])
  const h = parse(head), t = parse(tail)
  return tail === undefined ? h : [...h, ...Array<number>(8 - h.length - t.length).fill(0), ...t]
}

/**
 * An address as a socket or a proxy writes it, normalised: brackets, a port and an IPv6 zone dropped,
 * lower case, an IPv4-mapped IPv6 address (::ffff:192.0.2.1) as plain IPv4. null when it is no address.
 */
export function normaliseAddress(raw: string): string | null {
  let a = raw.trim()
  const bracketed = /^\[([^\]]+)\](?::\d+)?$/.exec(a)
  if (bracketed) a = bracketed[1]!
  else if (/^\d{1,3}(?:\.\d{1,3}){3}:\d+$/.test(a)) a = a.slice(0, a.lastIndexOf(':'))
  a = a.replace(/%.*$/, '').toLowerCase()
  const family = isIP(a)
  if (family === 4) return a
  if (family !== 6) return null
  const g = ipv6Groups(a)
  if (g.slice(0, 5).every((x) => x === 0) && g[5] === 0xffff) return `${g[6]! >> 8}.${g[6]! & 255}.${g[7]! >> 8}.${g[7]! & 255}`
  return a
}

/**
 * The key an address is counted under: an IPv4 address as it is, an IPv6 address by its /64 prefix
 * (one subscriber usually holds a whole /64, so counting single IPv6 addresses would give one client
 * 2^64 allowances).
 */
export function throttleBucket(address: string): string {
  if (isIP(address) !== 6) return address
  const g = ipv6Groups(address)
  return `${g.slice(0, 4).map((x) => x.toString(16)).join(':')}::/64`
}

/** The proxies whose X-Forwarded-* headers are believed: addresses and CIDR ranges, IPv4 or IPv6. */
export interface TrustedProxies { has(address: string): boolean; size: number }

/** Parses NUXT_TRUSTED_PROXIES ("127.0.0.1, 10.0.0.0/8, fd00::/8"); entries that are no address or range are ignored. */
export function parseTrustedProxies(list: string): TrustedProxies {
  const block = new BlockList()
  let size = 0
  for (const entry of list.split(',').map((s) => s.trim()).filter(Boolean)) {
    const [addr, prefix] = entry.split('/') as [string, string | undefined]
    const a = normaliseAddress(addr)
    if (!a) continue
    const type = isIP(a) === 6 ? 'ipv6' : 'ipv4'
    if (prefix === undefined) block.addAddress(a, type)
    else {
      const bits = Number(prefix)
      if (!Number.isInteger(bits) || bits < 0 || bits > (type === 'ipv6' ? 128 : 32)) continue
      block.addSubnet(a, bits, type)
    }
    size++
  }
  return {
    size,
    has(address: string) {
      const a = normaliseAddress(address)
      return !!a && size > 0 && block.check(a, isIP(a) === 6 ? 'ipv6' : 'ipv4')
    },
  }
}

/**
 * The client's address. A request from a trusted proxy names the client in X-Forwarded-For, where
 * each proxy appends the address it was connected from: the client is the RIGHT-most entry that is
 * not itself a trusted proxy. Entries to its left were written by the client and are ignored, so
 * prepending made-up entries changes nothing. From anyone else, the socket's peer address.
 */
export function clientAddressFrom(peer: string, forwardedFor: string | undefined, trusted: TrustedProxies): string {
  const p = normaliseAddress(peer) ?? peer
  if (!trusted.has(p)) return p
  const hops = (forwardedFor ?? '').split(',').map((s) => s.trim()).filter(Boolean)
  let nearest = p
  for (let i = hops.length - 1; i >= 0; i--) {
    const a = normaliseAddress(hops[i]!)
    // An entry that is no address cannot be trusted further: count the request under the last hop known.
    if (a === null) return nearest
    if (!trusted.has(a)) return a
    nearest = a
  }
  // Only trusted proxies on the way: the left-most is as close to the client as is known.
  return nearest
}
