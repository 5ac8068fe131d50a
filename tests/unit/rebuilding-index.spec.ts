import { describe, expect, it } from 'vitest'
import { RebuildingIndex } from '../../server/utils/rebuildingIndex'

/** A scheduler the test runs by hand, so that it can look between the steps of a background rebuild. */
function manual() {
  const queue: Array<() => void> = []
  return { schedule: (f: () => void) => { queue.push(f) }, runOne: () => queue.shift()?.(), get length() { return queue.length } }
}

describe('the basemap tile index is bounded', () => {
  it('is built once, reused for repeat tiles, and rebuilt once the limit of distinct tiles is reached', () => {
    let made = 0
    const s = manual()
    const idx = new RebuildingIndex(function* () { yield 'parse'; yield 'tile'; return { generation: ++made } }, 3, s.schedule)
    expect(idx.for('0/0/0').generation).toBe(1)
    expect(idx.for('1/0/0').generation).toBe(1)
    // A tile already cut does not count again, however often it is asked for.
    for (let i = 0; i < 10; i++) expect(idx.for('1/0/0').generation).toBe(1)
    expect(idx.pending).toBe(false)
    // The third distinct tile reaches the limit: a rebuild is started, but not in this call.
    expect(idx.for('1/1/0').generation).toBe(1)
    expect(idx.pending).toBe(true)
    expect(made).toBe(1)
    // Meanwhile the old index answers, and no second rebuild is started.
    expect(idx.for('2/0/0').generation).toBe(1)
    expect(idx.for('2/1/0').generation).toBe(1)
    // The rebuild runs one stage per turn of the event loop: two stages, then the swap.
    s.runOne()
    s.runOne()
    expect(idx.for('2/2/0').generation).toBe(1)
    s.runOne()
    expect(s.length).toBe(0)
    expect(idx.pending).toBe(false)
    // What the old index held is let go: the fresh one starts counting from nothing.
    expect(idx.for('0/0/0').generation).toBe(2)
    expect(idx.builds).toBe(2)
    expect(made).toBe(2)
  })

  it('a rebuild that fails leaves the old index serving, and a later tile tries again', () => {
    let made = 0
    let fail = false
    const s = manual()
    const idx = new RebuildingIndex(function* () { yield; if (fail) throw new Error('out of memory'); return ++made }, 2, s.schedule)
    idx.for('a')
    fail = true
    idx.for('b')
    const err = console.error
    console.error = () => {}
    try { while (s.length) s.runOne() } finally { console.error = err }
    expect(idx.pending).toBe(false)
    expect(idx.for('c')).toBe(1)
    fail = false
    while (s.length) s.runOne()
    expect(idx.for('d')).toBe(2)
  })
})
