import { existsSync } from 'node:fs'
import { resolve } from 'node:path'

/** Server tests run against the production build in .output (npm test builds it first). */
export default function setup() {
  if (!existsSync(resolve(__dirname, '../../.output/server/index.mjs'))) {
    throw new Error('No build in .output — run "npx nuxt build" (npm test does this) before the server tests')
  }
}
