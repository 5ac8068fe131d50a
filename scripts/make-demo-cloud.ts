// Writes the invented demo cloud grid (DEMO DATA — NOT A REAL CLIMATOLOGY) as a CSV grid:
//   npx tsx scripts/make-demo-cloud.ts > demo-cloud-august.csv
import { demoCloudCsv } from '../server/database/seed/demoCloud'

process.stdout.write(demoCloudCsv())
