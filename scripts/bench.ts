// npm run --silent bench -- <engine|all>   — speed figures as ratios measured in one run (never in tests).
import * as Astronomy from 'astronomy-engine'
import { performance } from 'node:perf_hooks'
import { computedElementsFor } from '../server/eclipse/catalogue'
import { localReport } from '../server/eclipse/report'
import {
  deltaTHourAngleRad, eclipsePath, greatestT, localCircumstances, offsetPoint, type BesselianElements, type Site,
} from '../shared/eclipse'

function rng(seed: number) { return () => { seed = (seed * 1103515245 + 12345) % 2147483648; return seed / 2147483648 } }

function sitesAlongPath(el: BesselianElements, n: number): Site[] {
  const rand = rng(2027)
  const dH = deltaTHourAngleRad(el.deltaTSec)
  const tg = greatestT(el)
  const out: Site[] = []
  while (out.length < n) {
    const p = offsetPoint(el, tg + (rand() - 0.5) * 2.6, (rand() - 0.5) * 2.6, 'umbra', dH)
    if (p) out.push({ latDeg: p.latDeg, lonDeg: p.lonDeg, elevationM: Math.round(rand() * 1500) })
  }
  return out
}

function engine() {
  const el = computedElementsFor('2027-08-02')!
  const sites = sitesAlongPath(el, 10_000)
  for (const s of sites.slice(0, 500)) localCircumstances(el, s) // warm-up
  let t = performance.now()
  let sink = 0
  for (const s of sites) sink += localCircumstances(el, s).durationSec
  const coreSec = (performance.now() - t) / 1000
  const coreRate = sites.length / coreSec

  t = performance.now()
  for (const s of sites.slice(0, 2000)) sink += localReport('2027-08-02', el, s).durationSec
  const fullRate = 2000 / ((performance.now() - t) / 1000)

  const aeSites = sites.slice(0, 200)
  const start = Astronomy.MakeTime(new Date(Date.UTC(2027, 7, 1)))
  t = performance.now()
  for (const s of aeSites) sink += Astronomy.SearchLocalSolarEclipse(start, new Astronomy.Observer(s.latDeg, s.lonDeg, s.elevationM ?? 0)).obscuration
  const aeRate = aeSites.length / ((performance.now() - t) / 1000)

  t = performance.now()
  const fc = eclipsePath(el, { stepSec: 10 })
  const pathMs = performance.now() - t
  if (!Number.isFinite(sink)) console.log('')
  console.log(`engine local circumstances (contacts, altitudes, P/V): ${Math.round(coreRate)} sites/s over ${sites.length} sites of 2027-08-02`)
  console.log(`engine full report (plus centreline distance, limits, uncertainty): ${Math.round(fullRate)} sites/s`)
  console.log(`astronomy-engine SearchLocalSolarEclipse: ${aeRate.toFixed(1)} sites/s over ${aeSites.length} sites`)
  console.log(`whole path at 10 s steps: ${pathMs.toFixed(0)} ms (${fc.features.length} features)`)
  console.log(`engine-speedup ${(coreRate / aeRate).toFixed(0)}`)
}

const what = process.argv[2] ?? 'all'
const benches: Record<string, () => void | Promise<void>> = { engine }
if (what !== 'all' && !benches[what]) {
  console.error(`bench: unknown bench "${what}"; choose ${Object.keys(benches).join(', ')} or all`)
  process.exit(2)
}
for (const [name, fn] of Object.entries(benches)) if (what === 'all' || what === name) await fn()
