import { afterEach, describe, expect, it } from 'vitest'
import { assertDemoSeedAllowed } from '../../server/utils/db'

// The demo's accounts share a published password: seeding them must be refused on a public host.
describe('demo seeding guard', () => {
  afterEach(() => { delete process.env.NUXT_ALLOW_DEMO_SEED; delete process.env.UMBRAFIELD_ALLOW_DEMO_SEED })
  it.each(['http://localhost:3000', 'http://127.0.0.1:3210/', 'http://[::1]:8080'])('allows the local %s', (url) => {
    expect(() => assertDemoSeedAllowed(url)).not.toThrow()
  })
  it.each(['https://trips.example.com', 'http://localhost.example.com', 'http://10.0.0.5:3000'])('refuses %s', (url) => {
    expect(() => assertDemoSeedAllowed(url)).toThrow(/refusing to seed demo data/)
  })
  it('allows a public host only with the explicit override', () => {
    process.env.NUXT_ALLOW_DEMO_SEED = 'yes'
    expect(() => assertDemoSeedAllowed('https://staging.example.com')).not.toThrow()
  })
  it.each(['http://localhost:3000', 'https://trips.example.com'])('refuses %s in a production build, with a message naming the switch', (url) => {
    expect(() => assertDemoSeedAllowed(url, 'production')).toThrow(/refusing to seed demo data .*NODE_ENV=production.*UMBRAFIELD_ALLOW_DEMO_SEED=1/)
  })
  it.each(['http://localhost:3000', 'https://staging.example.com'])('allows %s in a production build only with UMBRAFIELD_ALLOW_DEMO_SEED=1', (url) => {
    process.env.UMBRAFIELD_ALLOW_DEMO_SEED = '1'
    expect(() => assertDemoSeedAllowed(url, 'production')).not.toThrow()
    process.env.UMBRAFIELD_ALLOW_DEMO_SEED = 'true'
    expect(() => assertDemoSeedAllowed(url, 'production')).toThrow(/refusing to seed/)
  })
})
