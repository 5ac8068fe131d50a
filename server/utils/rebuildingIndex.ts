/**
 * Keeps a lazily built tile index and rebuilds it once `limit` distinct tiles have been cut from it:
 * the index caches every tile it cuts, so without a bound a crawl of zoom 10 would keep them all.
 */
export class RebuildingIndex<T> {
  private value: T | undefined
  private readonly cut = new Set<string>()
  builds = 0
  constructor(private readonly build: () => T, readonly limit: number) {}
  /** The index to cut tile `key` from; a fresh one when the bound is reached. */
  for(key: string): T {
    if (!this.cut.has(key) && this.cut.size >= this.limit) {
      this.value = undefined
      this.cut.clear()
    }
    if (this.value === undefined) {
      this.value = this.build()
      this.builds++
    }
    this.cut.add(key)
    return this.value
  }
}
