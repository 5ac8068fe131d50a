/**
 * A regular latitude/longitude grid of cell-centre values (EPSG:4326), row-major with rows
 * of constant latitude starting at lat0. NaN marks no data. Units are the caller's (percent here).
 */
export interface Grid {
  lat0: number
  lon0: number
  dlat: number
  dlon: number
  nlat: number
  nlon: number
  values: Float32Array | number[]
}

export type SampleMethod = 'bilinear' | 'bilinear over valid neighbours' | 'nearest valid cell' | 'outside grid' | 'no data nearby'

export interface Sample { value: number | null; method: SampleMethod }

const at = (g: Grid, i: number, j: number) => g.values[i * g.nlon + j] as number

/**
 * Bilinear interpolation between the four surrounding cell centres. When some of them are
 * no-data, the valid ones are re-weighted; when all four are, the nearest valid cells within
 * three cells are used (averaged when equally near). Points beyond half a cell outside the outermost centres are outside.
 */
export function sampleGrid(g: Grid, lat: number, lon: number): Sample {
  const fi = (lat - g.lat0) / g.dlat
  const fj = (lon - g.lon0) / g.dlon
  if (fi < -0.5 || fj < -0.5 || fi > g.nlat - 0.5 || fj > g.nlon - 0.5) return { value: null, method: 'outside grid' }
  const ci = Math.min(Math.max(fi, 0), g.nlat - 1)
  const cj = Math.min(Math.max(fj, 0), g.nlon - 1)
  const i0 = Math.min(Math.floor(ci), Math.max(g.nlat - 2, 0))
  const j0 = Math.min(Math.floor(cj), Math.max(g.nlon - 2, 0))
  const i1 = Math.min(i0 + 1, g.nlat - 1)
  const j1 = Math.min(j0 + 1, g.nlon - 1)
  const ti = i1 === i0 ? 0 : ci - i0
  const tj = j1 === j0 ? 0 : cj - j0
  const corners: Array<[number, number]> = [
    [at(g, i0, j0), (1 - ti) * (1 - tj)], [at(g, i0, j1), (1 - ti) * tj],
    [at(g, i1, j0), ti * (1 - tj)], [at(g, i1, j1), ti * tj],
  ]
  let sum = 0, wsum = 0, missing = 0
  for (const [v, w] of corners) {
    if (Number.isNaN(v)) { if (w > 0) missing++; continue }
    sum += v * w
    wsum += w
  }
  if (wsum > 1e-12) return { value: sum / wsum, method: missing ? 'bilinear over valid neighbours' : 'bilinear' }
  // All neighbours empty: the nearest valid cell centres within three cells (averaged when equally near).
  const ni = Math.round(ci), nj = Math.round(cj)
  let bestD = Infinity, bestSum = 0, bestN = 0
  for (let di = -3; di <= 3; di++) for (let dj = -3; dj <= 3; dj++) {
    const i = ni + di, j = nj + dj
    if (i < 0 || j < 0 || i >= g.nlat || j >= g.nlon) continue
    const v = at(g, i, j)
    if (Number.isNaN(v)) continue
    const d = (i - ci) ** 2 + (j - cj) ** 2
    if (d < bestD - 1e-9) { bestD = d; bestSum = v; bestN = 1 } else if (Math.abs(d - bestD) <= 1e-9) { bestSum += v; bestN++ }
  }
  const best = bestN ? bestSum / bestN : null
  return best === null ? { value: null, method: 'no data nearby' } : { value: best, method: 'nearest valid cell' }
}

/** Weights of the scattered and broken sky categories in P(clear) (clear counts 1, overcast 0). */
export interface CloudWeights { scattered: number; broken: number }
/**
 * The published weights: the weather-prospects tables of the NASA eclipse bulletins weigh the
 * frequency of clear skies 1, scattered cloud 0.72 and broken cloud 0.225. A workspace may set its own.
 */
export const CLOUD_WEIGHTS_DEFAULT: CloudWeights = { scattered: 0.72, broken: 0.225 }
export const CLOUD_WEIGHTS_SOURCE = 'the weather-prospects tables of the NASA eclipse bulletins'

/** The weighting in words, with where its weights come from (shown wherever P(clear) is). */
export function cloudWeightingText(w: CloudWeights = CLOUD_WEIGHTS_DEFAULT): string {
  const published = w.scattered === CLOUD_WEIGHTS_DEFAULT.scattered && w.broken === CLOUD_WEIGHTS_DEFAULT.broken
  return `clear + ${w.scattered} × scattered + ${w.broken} × broken (${published ? `weights from ${CLOUD_WEIGHTS_SOURCE}` : `this workspace's weights; the published ones, from ${CLOUD_WEIGHTS_SOURCE}, are ${CLOUD_WEIGHTS_DEFAULT.scattered} and ${CLOUD_WEIGHTS_DEFAULT.broken}`})`
}

/**
 * Chance of a clear enough sky. With cloud categories, the sky-category weighting
 * (% clear + w_s × % scattered + w_b × % broken) / 100, by default with the published weights
 * above. Otherwise the simpler estimate 1 − mean cloud fraction.
 */
export function pClearOf(cloudPct: number, categories?: { clear: number; scattered: number; broken: number }, weights: CloudWeights = CLOUD_WEIGHTS_DEFAULT): { pClear: number; method: string } {
  if (categories) {
    const p = (categories.clear + weights.scattered * categories.scattered + weights.broken * categories.broken) / 100
    return { pClear: Math.min(1, Math.max(0, p)), method: `sky-category weighting: ${cloudWeightingText(weights)}` }
  }
  return { pClear: Math.min(1, Math.max(0, 1 - cloudPct / 100)), method: 'simpler estimate: 1 − mean cloud fraction' }
}
