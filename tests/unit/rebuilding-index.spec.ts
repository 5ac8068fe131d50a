import { describe, expect, it } from 'vitest'
import { RebuildingIndex } from '../../server/utils/rebuildingIndex'

describe('the basemap tile index is bounded', () => {
  it('is built once, reused for repeat tiles, and rebuilt once the limit of distinct tiles is reached', () => {
    let made = 0
    const idx = new RebuildingIndex(() => ({ generation: ++made }), 3)
    expect(idx.for('0/0/0').generation).toBe(1)
    expect(idx.for('1/0/0').generation).toBe(1)
    expect(idx.for('1/1/0').generation).toBe(1)
    // A tile already cut does not count again, however often it is asked for.
    for (let i = 0; i < 10; i++) expect(idx.for('1/0/0').generation).toBe(1)
    // The fourth distinct tile starts a fresh index: what the old one held is let go.
    expect(idx.for('2/0/0').generation).toBe(2)
    expect(idx.for('0/0/0').generation).toBe(2)
    expect(idx.builds).toBe(2)
  })
})
