import { describe, expect, it } from 'vitest'
import { haversineKm } from '../../shared/geo/distance'
import { SEARCH_GRID_MAX_POINTS, searchGrid } from '../../server/services/searchGrid'

const wrap = (lon: number) => ((((lon + 180) % 360) + 360) % 360) - 180

describe('the best-ground search grid stays bounded near the poles', () => {
  it.each([
    [0, 500], [45, 500], [70, 500], [85, 500], [89, 500], [89.9, 500], [-89, 500], [89, 50], [60, 5],
  ])('at lat %s, radius %s km: at most the cap, every point in the disc, no point twice', (lat, radiusKm) => {
    const { points, stepKm } = searchGrid(lat, 10, radiusKm, Math.max(1, radiusKm / 100))
    expect(points.length).toBeGreaterThan(0)
    expect(points.length).toBeLessThanOrEqual(SEARCH_GRID_MAX_POINTS)
    expect(Math.max(...points.map((p) => haversineKm(lat, 10, p.lat, p.lon)))).toBeLessThanOrEqual(radiusKm + 1e-6)
    // Whole turns of longitude would be the same ground evaluated again.
    const keys = new Set(points.map((p) => `${p.lat.toFixed(6)},${wrap(p.lon).toFixed(4)}`))
    expect(keys.size).toBe(points.length)
    // The disc is still covered: about its area over the cell area (a spherical cap, and cells thin out at the pole gap).
    const capAreaKm2 = 2 * Math.PI * 6371 ** 2 * (1 - Math.cos(radiusKm / 6371))
    expect(points.length).toBeGreaterThan(0.5 * capAreaKm2 / stepKm ** 2)
  })

  it('away from the poles the step is as asked; a tight cap widens it', () => {
    expect(searchGrid(25, 32, 150, 1.5).stepKm).toBe(1.5)
    const coarse = searchGrid(25, 32, 150, 1.5, 5000)
    expect(coarse.stepKm).toBeGreaterThan(1.5)
    expect(coarse.points.length).toBeLessThanOrEqual(5000)
  })
})
