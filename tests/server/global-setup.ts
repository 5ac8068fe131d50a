import { spawn, type ChildProcess } from 'node:child_process'
import { existsSync } from 'node:fs'
import { resolve } from 'node:path'
import { fakeServices } from '../../scripts/fakes.mjs'

/** Port of the app under test (server tests run one file at a time on it), so the fakes can call back. */
export const TEST_APP_PORT = 3233
export const TEST_FAKE_PORTS = { STRIPE_FAKE_PORT: '12112', MAIL_FAKE_SMTP_PORT: '11025', MAIL_FAKE_WEB_PORT: '11080' }

/** Server tests run against the production build in .output (npm test builds it first), with the local fakes started here. */
export default async function setup() {
  const root = resolve(__dirname, '../..')
  if (!existsSync(resolve(root, '.output/server/index.mjs'))) {
    throw new Error('No build in .output — run "npx nuxt build" (npm test does this) before the server tests')
  }
  Object.assign(process.env, TEST_FAKE_PORTS)
  const children: ChildProcess[] = []
  for (const f of fakeServices({ appPort: TEST_APP_PORT })) {
    const child = spawn(process.execPath, f.args, { cwd: root, env: { ...process.env, ...f.env }, stdio: 'ignore' })
    children.push(child)
    for (let i = 0; i < 100; i++) {
      try { if ((await fetch(f.health)).ok) break } catch { /* starting */ }
      await new Promise((r) => setTimeout(r, 100))
    }
  }
  return () => { for (const c of children) c.kill('SIGTERM') }
}
