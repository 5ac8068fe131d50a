/**
 * Keeps a lazily built tile index and rebuilds it once `limit` distinct tiles have been cut from it:
 * the index caches every tile it cuts, so without a bound a crawl of zoom 10 would keep them all.
 *
 * The first build happens on first use (at start-up, before the app reports ready). A rebuild never
 * runs inside a request: it is started in the background, one stage of the build (a generator's step)
 * per turn of the event loop so that requests in between are served, and the old index keeps serving
 * until the new one is complete.
 */
export class RebuildingIndex<T> {
  private value: T | undefined
  private readonly cut = new Set<string>()
  private rebuilding = false
  builds = 0
  constructor(
    private readonly build: () => Generator<unknown, T, void>,
    readonly limit: number,
    private readonly schedule: (step: () => void) => void = (step) => setImmediate(step),
  ) {}

  /** Whether a background rebuild is under way. */
  get pending(): boolean { return this.rebuilding }

  /** The index to cut tile `key` from. */
  for(key: string): T {
    if (this.value === undefined) {
      const steps = this.build()
      let r = steps.next()
      while (!r.done) r = steps.next()
      this.value = r.value
      this.builds++
    }
    if (!this.cut.has(key)) {
      this.cut.add(key)
      if (this.cut.size >= this.limit && !this.rebuilding) this.rebuildInBackground()
    }
    return this.value
  }

  private rebuildInBackground() {
    this.rebuilding = true
    const steps = this.build()
    const step = () => {
      let r: IteratorResult<unknown, T>
      try {
        r = steps.next()
      } catch (e) {
        // The old index stays; the next new tile tries again.
        this.rebuilding = false
        console.error('tile index rebuild failed', e)
        return
      }
      if (!r.done) return this.schedule(step)
      this.value = r.value
      this.cut.clear()
      this.builds++
      this.rebuilding = false
    }
    this.schedule(step)
  }
}
