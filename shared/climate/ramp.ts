/** Umbrafield's cloud colour ramp: warm clear-sky cream through slate to deep overcast violet. Stops in percent. */
export const CLOUD_RAMP: Array<[number, string]> = [
  [0, '#fdf3d0'], [15, '#efe3a6'], [30, '#c9d1bf'], [45, '#9fb0c8'], [60, '#7c84b0'], [80, '#554d88'], [100, '#2e2852'],
]

function hex(c: string): [number, number, number] {
  return [parseInt(c.slice(1, 3), 16), parseInt(c.slice(3, 5), 16), parseInt(c.slice(5, 7), 16)]
}

export function cloudColour(pct: number): string {
  const p = Math.max(0, Math.min(100, pct))
  for (let i = 1; i < CLOUD_RAMP.length; i++) {
    const [p1, c1] = CLOUD_RAMP[i]!
    const [p0, c0] = CLOUD_RAMP[i - 1]!
    if (p <= p1) {
      const t = (p - p0) / (p1 - p0)
      const a = hex(c0), b = hex(c1)
      return '#' + a.map((v, k) => Math.round(v + (b[k]! - v) * t).toString(16).padStart(2, '0')).join('')
    }
  }
  return CLOUD_RAMP[CLOUD_RAMP.length - 1]![1]
}
