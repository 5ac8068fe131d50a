// Writes an invented demo cloud grid (DEMO DATA — NOT A REAL CLIMATOLOGY) as a CSV grid:
//   npx tsx scripts/make-demo-cloud.ts > demo-cloud-august.csv            the 2027-08-02 region, August
//   npx tsx scripts/make-demo-cloud.ts 2030-11-25 > demo-cloud-2030.csv   the grid the demo seeds for a later eclipse
import { demoCloudCsv, demoCloudCsvFor } from '../server/database/seed/demoCloud'
import { demoCloudRegionFor } from '../server/database/seed/demoScenario'

const eclipseId = process.argv[2]
if (!eclipseId) {
  process.stdout.write(demoCloudCsv())
} else {
  const region = demoCloudRegionFor(eclipseId)
  if (!region) {
    console.error(`No central path for ${eclipseId} in the catalogue (1900–2100).`)
    process.exit(1)
  }
  process.stdout.write(demoCloudCsvFor(eclipseId, Number(eclipseId.slice(5, 7)), region))
}
