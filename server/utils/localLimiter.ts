/**
 * The in-process rate limiter (SQLite set-up): a sliding window per key, kept as counts per 1/slots
 * of the window (a slot that straddles the window's start counts in full, so the count errs on the
 * side of refusing). At most `maxKeys` keys are kept; beyond that the key used longest ago is
 * forgotten first, so a flood of made-up keys (addresses) cannot grow the map without end.
 */
export class LocalLimiter {
  /** Per key: [slot index, hits] pairs, oldest first. Keys are kept least recently used first (Map order). */
  private readonly keys = new Map<string, Array<[number, number]>>()
  constructor(readonly maxKeys: number, private readonly slots = 60) {}

  get size(): number { return this.keys.size }

  /** Counts a request at `nowMs`; null when it is allowed, else the seconds until it would be (it is then not counted). */
  hit(key: string, limit: number, windowMs: number, nowMs: number): number | null {
    const slotMs = windowMs / this.slots
    const current = Math.floor(nowMs / slotMs)
    // Slots from the one holding (now − windowMs) onwards.
    const slots = (this.keys.get(key) ?? []).filter(([k]) => k >= current - this.slots)
    this.keys.delete(key)
    this.keys.set(key, slots)
    while (this.keys.size > this.maxKeys) this.keys.delete(this.keys.keys().next().value!)
    const count = slots.reduce((n, [, c]) => n + c, 0)
    if (count >= limit) return Math.max(1, Math.ceil(((slots[0]![0] + this.slots + 1) * slotMs - nowMs) / 1000))
    const last = slots[slots.length - 1]
    if (last?.[0] === current) last[1]++
    else slots.push([current, 1])
    return null
  }
}
