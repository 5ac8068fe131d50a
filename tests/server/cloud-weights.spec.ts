import { describe, expect, it } from 'vitest'
import { api, ORGANISER, signIn, TEST_DB, useApp } from './app'

// The P(clear) weights are the workspace's own setting: validated, named with their source, and used.
await useApp()

interface SiteRow { id: number; metrics: { pClear: number | null; pClearMethod: string | null } }
const sitesOf = async (cookie: string) => ((await api('/api/workspaces/1/sites', { cookie })).body.data as SiteRow[]).filter((s) => s.metrics.pClear !== null && /sky-category/.test(s.metrics.pClearMethod ?? ''))
const setWeights = (cookie: string, cloudWeights: unknown) => api('/api/workspaces/1', { method: 'PATCH', cookie, body: { cloudWeights } })

describe(`cloud weights (${TEST_DB})`, () => {
  it('the published weights name their source; bad weights are refused by field; the organiser\'s weights are used', async () => {
    const org = await signIn(ORGANISER)
    const before = await sitesOf(org)
    expect(before.length).toBeGreaterThan(0)
    for (const s of before) expect(s.metrics.pClearMethod).toMatch(/0\.72 × scattered \+ 0\.225 × broken.*weather-prospects tables of the NASA eclipse bulletins/)
    expect((await api('/api/workspaces/1', { cookie: org })).body.cloudWeights).toEqual({ scattered: 0.72, broken: 0.225 })

    for (const [bad, field] of [[{ scattered: 1.2, broken: 0.2 }, 'scattered'], [{ scattered: 0.5, broken: -0.1 }, 'broken'], [{ scattered: 0.3, broken: 0.6 }, 'broken']] as const) {
      const r = await setWeights(org, bad)
      expect(r.status).toBe(400)
      expect(JSON.stringify(r.body.data)).toContain(field)
    }
    // P(clear) is linear in the weights: at (½, ½) it lies halfway between (0, 0) and (1, 1), to the
    // 0.001 the figure is rounded to (twice, plus one for the midpoint).
    const at = async (w: { scattered: number; broken: number }) => {
      expect((await setWeights(org, w)).status).toBe(200)
      return new Map((await sitesOf(org)).map((s) => [s.id, s.metrics]))
    }
    const lo = await at({ scattered: 0, broken: 0 })
    const hi = await at({ scattered: 1, broken: 1 })
    const mid = await at({ scattered: 0.5, broken: 0.5 })
    let differ = 0
    for (const [id, m] of mid) {
      expect(Math.abs(m.pClear! - (lo.get(id)!.pClear! + hi.get(id)!.pClear!) / 2)).toBeLessThanOrEqual(0.0015)
      expect(m.pClearMethod).toMatch(/0\.5 × scattered \+ 0\.5 × broken \(this workspace's weights; the published ones, from the weather-prospects tables of the NASA eclipse bulletins, are 0\.72 and 0\.225\)/)
      if (hi.get(id)!.pClear! - lo.get(id)!.pClear! > 0.01) differ++
    }
    expect(differ).toBeGreaterThan(0)
    // Back to the published weights.
    expect((await setWeights(org, null)).status).toBe(200)
    expect((await api('/api/workspaces/1', { cookie: org })).body.cloudWeights).toEqual({ scattered: 0.72, broken: 0.225 })
  })
})
