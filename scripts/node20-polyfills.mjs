// Node 20 lacks Object.groupBy and Map.groupBy (Node 21+), which the lint toolchain's config utilities
// call. Loaded with `node --import` for `npm run lint` only; the app itself does not need them.
if (!Object.groupBy) {
  Object.groupBy = (items, key) => {
    const out = Object.create(null)
    let i = 0
    for (const item of items) (out[key(item, i++)] ??= []).push(item)
    return out
  }
}
if (!Map.groupBy) {
  Map.groupBy = (items, key) => {
    const out = new Map()
    let i = 0
    for (const item of items) {
      const k = key(item, i++)
      if (!out.has(k)) out.set(k, [])
      out.get(k).push(item)
    }
    return out
  }
}
