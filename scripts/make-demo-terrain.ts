// npx tsx scripts/make-demo-terrain.ts [out.tif] — DEMO DATA: writes an invented height model (a straight ridge
// 2 km out from the demo site "Tangier Cap Spartel", across the Sun's direction at C2 of 2027-08-02 and standing
// 2° above the Sun) for trying the terrain check. Not a real place's terrain.
import { mkdirSync, writeFileSync } from 'node:fs'
import { dirname } from 'node:path'
import { computedElementsFor } from '../server/eclipse/catalogue'
import { localReport } from '../server/eclipse/report'
import { DEMO_SITES } from '../server/database/seed/demo'
import { ridgeTiff } from '../server/database/seed/demoTerrain'

const out = process.argv[2] ?? 'data/demo-ridge-tangier.tif'
const site = DEMO_SITES.find((s) => s.name === 'Tangier Cap Spartel')!
const r = localReport('2027-08-02', computedElementsFor('2027-08-02')!, { latDeg: site.lat, lonDeg: site.lon, elevationM: site.elevationM })
const distanceKm = 2
const heightM = Math.round(site.elevationM + distanceKm * 1000 * Math.tan(((r.c2!.apparentAltitudeDeg + 2) * Math.PI) / 180))
mkdirSync(dirname(out), { recursive: true })
writeFileSync(out, ridgeTiff({ lat: site.lat, lon: site.lon, azimuthDeg: r.c2!.azimuthDeg, distanceKm, heightM, groundM: site.elevationM, halfSizeDeg: 0.08, cellDeg: 0.0008 }))
console.log(`${out}: invented ridge ${heightM} m high, ${distanceKm} km from ${site.name} toward azimuth ${r.c2!.azimuthDeg.toFixed(0)}° (the Sun at C2, ${r.c2!.apparentAltitudeDeg.toFixed(1)}° up)`)
