import { compassShort } from '../safety/cues'

/**
 * Geometry of the briefing's sky diagram: a panorama of the sky facing the Sun, azimuth across and
 * altitude up, with the horizon at the bottom. One function for the web page (SVG) and the PDF.
 */
export interface SkyPoint { label: string; altitudeDeg: number; azimuthDeg: number }
export interface SkyDiagram {
  width: number
  height: number
  horizonY: number
  /** Vertical grid: altitude lines every 15°. */
  altitudes: Array<{ y: number; label: string }>
  /** Compass ticks along the horizon. */
  ticks: Array<{ x: number; label: string }>
  /** Sun positions; contacts closer than two dots' widths share one dot and one label ("C2 · Max · C3"). */
  sun: Array<{ x: number; y: number; label: string }>
  /** Planets and stars, with label positions moved apart where they would overlap. */
  objects: Array<{ x: number; y: number; label: string; labelX: number; labelY: number }>
  /** Objects above the horizon but outside the view (behind the observer). */
  behind: string[]
}

const wrap = (d: number) => ((((d + 180) % 360) + 360) % 360) - 180

export function skyDiagram(sun: SkyPoint[], objects: SkyPoint[], opts: { width?: number; height?: number; spanDeg?: number } = {}): SkyDiagram {
  const width = opts.width ?? 640
  const height = opts.height ?? 260
  const span = opts.spanDeg ?? 240
  const pad = { top: 16, bottom: 28 }
  const horizonY = height - pad.bottom
  // Centre on the Sun's azimuth at maximum (the middle sun point), or the first one.
  const centre = (sun[Math.floor(sun.length / 2)] ?? sun[0])?.azimuthDeg ?? 180
  // The altitude scale reaches a little above the highest thing to draw (at least 45°).
  const top = Math.min(90, Math.max(45, ...sun.map((s) => s.altitudeDeg + 10), ...objects.map((o) => o.altitudeDeg + 10)))
  const x = (az: number) => width / 2 + (wrap(az - centre) / span) * width
  const y = (alt: number) => horizonY - (Math.max(-2, alt) / top) * (horizonY - pad.top)
  const inView = (az: number) => Math.abs(wrap(az - centre)) <= span / 2
  const ticks: SkyDiagram['ticks'] = []
  for (let az = 0; az < 360; az += 22.5) if (inView(az)) ticks.push({ x: x(az), label: compassShort(az) })
  const altitudes: SkyDiagram['altitudes'] = []
  for (let a = 15; a < top; a += 15) altitudes.push({ y: y(a), label: `${a}°` })
  return {
    width, height, horizonY, altitudes, ticks,
    sun: mergeClose(sun.map((s) => ({ x: x(s.azimuthDeg), y: y(s.altitudeDeg), label: s.label }))),
    objects: placeLabels(objects.filter((o) => o.altitudeDeg > 0 && inView(o.azimuthDeg)).map((o) => ({ x: x(o.azimuthDeg), y: y(o.altitudeDeg), label: o.label })), width),
    behind: objects.filter((o) => o.altitudeDeg > 0 && !inView(o.azimuthDeg)).map((o) => o.label),
  }
}

function mergeClose(points: Array<{ x: number; y: number; label: string }>) {
  const out: typeof points = []
  for (const p of points) {
    const last = out[out.length - 1]
    if (last && Math.hypot(last.x - p.x, last.y - p.y) < 30) last.label = `${last.label} · ${p.label}`
    else out.push({ ...p })
  }
  return out
}

/** Labels to the right of their dot (left near the right edge), nudged down or up until they do not overlap. */
function placeLabels(points: Array<{ x: number; y: number; label: string }>, width: number) {
  const boxes: Array<{ x0: number; x1: number; y0: number; y1: number }> = []
  return points.map((p) => {
    const w = p.label.length * 6.2
    const left = p.x + 6 + w > width
    const x0 = left ? p.x - 6 - w : p.x + 6
    let best = p.y + 4
    for (const dy of [0, 12, -12, 24, -24, 36]) {
      const y = p.y + 4 + dy
      const clash = boxes.some((b) => x0 < b.x1 && x0 + w > b.x0 && y - 10 < b.y1 && y > b.y0)
      if (!clash) { best = y; break }
    }
    boxes.push({ x0, x1: x0 + w, y0: best - 10, y1: best })
    return { ...p, labelX: x0, labelY: best }
  })
}
