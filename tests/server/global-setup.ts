import { spawn, type ChildProcess } from 'node:child_process'
import { existsSync } from 'node:fs'
import { resolve } from 'node:path'
import type { TestProject } from 'vitest/node'
import { fakeServices } from '../../scripts/fakes.mjs'
import { freePort } from '../../scripts/free-port.mjs'

/** Ports this run of the server suite uses: picked free at start, so two suites can run side by side. */
export interface TestPorts {
  /** The app under test (server tests run one file at a time on it), so the fakes can call back. */
  app: number
  fakes: { STRIPE_FAKE_PORT: string; MAIL_FAKE_SMTP_PORT: string; MAIL_FAKE_WEB_PORT: string; FORECAST_FAKE_PORT: string; SMS_FAKE_PORT: string }
}

declare module 'vitest' {
  export interface ProvidedContext { testPorts: TestPorts }
}

/** Server tests run against the production build in .output (npm test builds it first), with the local fakes started here. */
export default async function setup(project: TestProject) {
  const root = resolve(__dirname, '../..')
  if (!existsSync(resolve(root, '.output/server/index.mjs'))) {
    throw new Error('No build in .output — run "npx nuxt build" (npm test does this) before the server tests')
  }
  const ports: TestPorts = {
    app: await freePort(),
    fakes: { STRIPE_FAKE_PORT: String(await freePort()), MAIL_FAKE_SMTP_PORT: String(await freePort()), MAIL_FAKE_WEB_PORT: String(await freePort()), FORECAST_FAKE_PORT: String(await freePort()), SMS_FAKE_PORT: String(await freePort()) },
  }
  project.provide('testPorts', ports)
  Object.assign(process.env, ports.fakes)
  const children: ChildProcess[] = []
  for (const f of fakeServices({ appPort: ports.app })) {
    const child = spawn(process.execPath, f.args, { cwd: root, env: { ...process.env, ...f.env }, stdio: 'ignore' })
    children.push(child)
    // Up to 30 s: on a busy machine a fake can take a while to answer its first request.
    let up = false
    for (let i = 0; i < 300 && !up; i++) {
      try { up = (await fetch(f.health)).ok } catch { /* starting */ }
      if (!up) await new Promise((r) => setTimeout(r, 100))
    }
    if (!up) {
      // Leave nothing running behind a failed start.
      for (const c of children) c.kill('SIGTERM')
      throw new Error(`${f.name} did not start on ${f.health}`)
    }
  }
  return () => { for (const c of children) c.kill('SIGTERM') }
}
