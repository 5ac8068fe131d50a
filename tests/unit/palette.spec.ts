import { describe, expect, it } from 'vitest'
import config from '../../tailwind.config'

/**
 * Contrast is settled in the palette, so every page that uses a text shade on a surface shade passes
 * WCAG 2.2 AA: 4.5:1 for body text (1.4.3) and 3:1 for the parts of controls and focus rings (1.4.11).
 * Ratios follow the WCAG 2.x definition of relative luminance (sRGB, linearised).
 */
const colors = config.theme.extend.colors as unknown as Record<string, string | Record<string, string>>

function hex(name: string): string {
  if (name.startsWith('#')) return name
  if (name === 'white') return '#ffffff'
  const [scale, shade] = name.split('-') as [string, string | undefined]
  const c = colors[scale]
  const value = typeof c === 'string' ? c : c?.[shade ?? '']
  if (!value) throw new Error(`no colour ${name} in the palette`)
  return value
}

function luminance(h: string): number {
  const [r, g, b] = [1, 3, 5].map((i) => Number.parseInt(h.slice(i, i + 2), 16) / 255)
    .map((v) => (v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4)) as [number, number, number]
  return 0.2126 * r + 0.7152 * g + 0.0722 * b
}

function contrast(a: string, b: string): number {
  const [hi, lo] = [luminance(hex(a)), luminance(hex(b))].sort((x, y) => y - x) as [number, number]
  return (hi + 0.05) / (lo + 0.05)
}

const LIGHT_SURFACES = ['white', 'paper', 'umbra-50', 'umbra-100', 'corona-50', 'corona-100', 'prominence-50', 'prominence-100', 'meadow-50', 'meadow-100']
const DARK_SURFACES = ['umbra-800', 'umbra-900', 'umbra-950']
/** Shades the pages use as text on light surfaces (muted notes, labels, warnings, success). */
const TEXT_ON_LIGHT = ['umbra-400', 'umbra-500', 'umbra-600', 'umbra-700', 'umbra-900', 'umbra-950', 'corona-700', 'corona-800', 'corona-900', 'prominence-600', 'prominence-700', 'meadow-600', 'meadow-700']
/** Shades the header, hero and buttons use as text on the night-sky surfaces. */
const TEXT_ON_DARK = ['umbra-50', 'umbra-100', 'umbra-200', 'umbra-300', 'corona-100', 'corona-200', 'corona-300', 'corona-400']

describe('palette contrast (WCAG 2.2 AA)', () => {
  it('the helper itself reproduces the published extremes: black on white is 21:1, a colour on itself 1:1', () => {
    expect(contrast('white', 'white')).toBeCloseTo(1, 6)
    expect(contrast('#000000', 'white')).toBeCloseTo(21, 6)
  })

  for (const text of TEXT_ON_LIGHT) {
    it(`${text} text reaches 4.5:1 on every light surface`, () => {
      for (const bg of LIGHT_SURFACES) expect(contrast(text, bg), `${text} on ${bg}`).toBeGreaterThanOrEqual(4.5)
    })
  }
  for (const text of TEXT_ON_DARK) {
    it(`${text} text reaches 4.5:1 on the dark surfaces`, () => {
      for (const bg of DARK_SURFACES) expect(contrast(text, bg), `${text} on ${bg}`).toBeGreaterThanOrEqual(4.5)
    })
  }
  it('control boundaries and marks (umbra-300 input borders, corona-500 focus ring) reach 3:1 on white and paper', () => {
    for (const ui of ['umbra-300', 'corona-500']) {
      for (const bg of ['white', 'paper']) expect(contrast(ui, bg), `${ui} on ${bg}`).toBeGreaterThanOrEqual(3)
    }
    // The focus ring also shows on the dark header.
    for (const bg of DARK_SURFACES) expect(contrast('corona-500', bg), `corona-500 on ${bg}`).toBeGreaterThanOrEqual(3)
  })
  it('the primary buttons: corona-100 on umbra-800 and umbra-950 on corona-400 reach 4.5:1', () => {
    expect(contrast('corona-100', 'umbra-800')).toBeGreaterThanOrEqual(4.5)
    expect(contrast('umbra-950', 'corona-400')).toBeGreaterThanOrEqual(4.5)
  })
})
