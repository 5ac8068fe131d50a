import { describe, expect, it } from 'vitest'
import { LocalLimiter } from '../../server/utils/localLimiter'

const MIN = 60_000
const T0 = 1_800_000_000_000

describe('the in-process rate limiter', () => {
  it('allows `limit` requests in a sliding window, then refuses with the wait until the oldest leaves it', () => {
    const l = new LocalLimiter(10)
    for (let i = 0; i < 3; i++) expect(l.hit('a', 3, MIN, T0 + i * 1000)).toBeNull()
    const wait = l.hit('a', 3, MIN, T0 + 5000)
    // The first hit (T0) leaves the window one minute and at most one slot (1 s) later.
    expect(wait).toBeGreaterThanOrEqual(55)
    expect(wait).toBeLessThanOrEqual(57)
    // A refused request is not counted; another key has its own allowance.
    expect(l.hit('b', 3, MIN, T0 + 5000)).toBeNull()
    expect(l.hit('a', 3, MIN, T0 + 59_000)).not.toBeNull()
    // Once the first hits are more than a window (plus a slot) old, requests pass again.
    expect(l.hit('a', 3, MIN, T0 + 62_000)).toBeNull()
  })

  it('keeps at most maxKeys keys, forgetting the one used longest ago first', () => {
    const l = new LocalLimiter(3)
    for (const k of ['a', 'b', 'c']) expect(l.hit(k, 1, MIN, T0)).toBeNull()
    // 'a' is used again (refused, but still touched), so 'b' is now the oldest.
    expect(l.hit('a', 1, MIN, T0)).not.toBeNull()
    for (let i = 0; i < 1000; i++) l.hit(`flood-${i}`, 1, MIN, T0)
    expect(l.size).toBe(3)
    // The flood pushed every earlier key out: their counts are gone.
    expect(l.hit('a', 1, MIN, T0)).toBeNull()
    const small = new LocalLimiter(3)
    for (const k of ['a', 'b', 'c']) small.hit(k, 1, MIN, T0)
    small.hit('a', 1, MIN, T0)
    small.hit('d', 1, MIN, T0)
    expect(small.size).toBe(3)
    expect(small.hit('a', 1, MIN, T0)).not.toBeNull() // still counted: recently used
    expect(small.hit('b', 1, MIN, T0)).toBeNull() // forgotten: it was the oldest
  })
})
