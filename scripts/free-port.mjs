// Free loopback ports, so two test suites (or a suite beside the demo) never collide.
// The port is released before use; another process could take it in between, which is rare enough.
import { spawnSync } from 'node:child_process'
import { createServer } from 'node:net'

/** @returns {Promise<number>} a TCP port that was free on 127.0.0.1 a moment ago */
export function freePort() {
  return new Promise((resolve, reject) => {
    const s = createServer()
    s.unref()
    s.on('error', reject)
    s.listen(0, '127.0.0.1', () => {
      const { port } = /** @type {import('node:net').AddressInfo} */ (s.address())
      s.close(() => resolve(port))
    })
  })
}

/** The same, synchronously, for configuration files that cannot await (Playwright's). */
export function freePortSync() {
  const r = spawnSync(process.execPath, ['--input-type=module', '-e',
    "import { createServer } from 'node:net'; const s = createServer().listen(0, '127.0.0.1', () => { console.log(s.address().port); s.close() })"], { encoding: 'utf8' })
  const port = Number(r.stdout.trim())
  if (!Number.isInteger(port) || port <= 0) throw new Error(`could not find a free port: ${r.stderr}`)
  return port
}
