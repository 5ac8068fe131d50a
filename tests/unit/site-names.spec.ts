import { describe, expect, it } from 'vitest'
import { heightLabel } from '../../shared/sites/height'
import { isAutomaticSiteName } from '../../shared/sites/names'

describe('names the planning page makes up', () => {
  it.each([
    ['Best ground 1 (25.687, 32.640)', true],
    ['best ground 12 (−3.1, 40.0)', true],
    ['Site 7', true],
    ['Site at 25.900, 32.700', true],
    ['Site at -3.100, 40.000', true],
    ['Luxor West Bank', false],
    ['Best ground near Qena', false],
    ['Site 7 — the dunes', false],
    ['Sites of Karnak', false],
  ])('%s → %s', (name, auto) => {
    expect(isAutomaticSiteName(name)).toBe(auto)
  })
})

describe('height labels', () => {
  it.each([[null, 'not set'], [undefined, 'not set'], [0, '0 m'], [347.4, '347 m'], [-12, '-12 m']])('%s → %s', (v, want) => {
    expect(heightLabel(v)).toBe(want)
  })
})
