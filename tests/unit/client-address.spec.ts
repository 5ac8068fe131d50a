import { describe, expect, it } from 'vitest'
import { clientAddressFrom, normaliseAddress, parseTrustedProxies, throttleBucket } from '../../server/utils/clientAddress'

describe('addresses are normalised', () => {
  it.each([
    ['192.0.2.1', '192.0.2.1'],
    [' 192.0.2.1 ', '192.0.2.1'],
    ['192.0.2.1:4711', '192.0.2.1'],
    ['::ffff:192.0.2.1', '192.0.2.1'],
    ['::ffff:c000:201', '192.0.2.1'],
    ['[2001:DB8::1]:443', '2001:db8::1'],
    ['fe80::1%eth0', 'fe80::1'],
    ['2001:db8::1', '2001:db8::1'],
    ['unknown', null],
    ['', null],
    ['192.0.2.300', null],
    ['evil.example', null],
  ])('%j → %j', (raw, want) => {
    expect(normaliseAddress(raw)).toBe(want)
  })
})

describe('IPv6 clients are counted per /64', () => {
  it.each([
    ['192.0.2.1', '192.0.2.1'],
    ['2001:db8:1:2:aaaa:bbbb:cccc:dddd', '2001:db8:1:2::/64'],
    ['2001:db8:1:2::1', '2001:db8:1:2::/64'],
    ['2001:db8:1:2:ffff::', '2001:db8:1:2::/64'],
    ['2001:db8::', '2001:db8:0:0::/64'],
    ['::1', '0:0:0:0::/64'],
    ['2001:db8:1:3::1', '2001:db8:1:3::/64'],
  ])('%s is counted as %s', (address, bucket) => {
    expect(throttleBucket(address)).toBe(bucket)
  })

  it('two addresses in one /64 share a bucket; neighbouring /64s do not', () => {
    expect(throttleBucket('2001:db8:a:b::1')).toBe(throttleBucket('2001:db8:a:b:ffff:ffff:ffff:ffff'))
    expect(throttleBucket('2001:db8:a:b::1')).not.toBe(throttleBucket('2001:db8:a:c::1'))
  })
})

describe('trusted proxies', () => {
  const trusted = parseTrustedProxies('127.0.0.1, 10.0.0.0/8, fd00::/8, not-an-address, 192.0.2.0/99')
  it.each([
    ['127.0.0.1', true],
    ['::ffff:127.0.0.1', true],
    ['10.20.30.40', true],
    ['11.0.0.1', false],
    ['fd12::5', true],
    ['2001:db8::1', false],
    ['192.0.2.5', false],
    ['', false],
  ])('%j trusted: %s', (address, want) => {
    expect(trusted.has(address)).toBe(want)
  })
  it('ignores entries that are no address or range', () => {
    expect(trusted.size).toBe(3)
    expect(parseTrustedProxies('').has('127.0.0.1')).toBe(false)
  })
})

describe('the client behind trusted proxies is the right-most untrusted X-Forwarded-For entry', () => {
  const trusted = parseTrustedProxies('127.0.0.1, 10.0.0.0/8')
  it.each([
    // peer, X-Forwarded-For, client
    ['203.0.113.9', '198.51.100.1', '203.0.113.9'], // not from a proxy: the header is ignored
    ['127.0.0.1', undefined, '127.0.0.1'], // from the proxy without a header: the proxy
    ['127.0.0.1', '198.51.100.1', '198.51.100.1'],
    ['127.0.0.1', '6.6.6.6, 198.51.100.1', '198.51.100.1'], // a prepended entry is ignored
    ['127.0.0.1', '6.6.6.6,7.7.7.7 , 198.51.100.1', '198.51.100.1'],
    ['127.0.0.1', '198.51.100.1, 10.1.2.3', '198.51.100.1'], // two proxies in a row
    ['127.0.0.1', '6.6.6.6, 198.51.100.1, 10.1.2.3, 10.9.9.9', '198.51.100.1'],
    ['127.0.0.1', '10.1.2.3, 10.9.9.9', '10.1.2.3'], // only proxies: the left-most
    ['127.0.0.1', '6.6.6.6, garbage', '127.0.0.1'], // no address where the client should be: the last known hop
    ['127.0.0.1', '6.6.6.6, garbage, 10.1.2.3', '10.1.2.3'],
    ['::ffff:127.0.0.1', '[2001:db8::7]:5000', '2001:db8::7'],
    ['127.0.0.1', '::ffff:198.51.100.1', '198.51.100.1'],
  ])('peer %s, X-Forwarded-For %j → %s', (peer, xff, want) => {
    expect(clientAddressFrom(peer, xff, trusted)).toBe(want)
  })
})
