// A throwaway PostgreSQL cluster for tests and benches: initdb in a temp folder, pg_ctl on a free
// loopback port, removed again by stop(). Uses Debian's postgresql (15) binaries; installs the
// package with apt when it is missing and we are root (like Chromium). As root the server runs as
// the "postgres" user (PostgreSQL refuses to run as root). Any failure throws: never silently skipped.
import { execFileSync, spawnSync } from 'node:child_process'
import { chmodSync, existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs'
import { createServer } from 'node:net'
import { tmpdir } from 'node:os'
import { join } from 'node:path'

const isRoot = () => typeof process.getuid === 'function' && process.getuid() === 0

function binDir() {
  const base = '/usr/lib/postgresql'
  if (!existsSync(base)) return null
  const versions = readdirSync(base).filter((v) => existsSync(join(base, v, 'bin', 'initdb'))).sort((a, b) => Number(b) - Number(a))
  return versions.length ? join(base, versions[0], 'bin') : null
}

/** The directory holding initdb and pg_ctl, installing Debian's postgresql first when needed and allowed. */
export function ensurePostgres() {
  let dir = binDir()
  if (dir) return dir
  if (!isRoot()) throw new Error("PostgreSQL server binaries are missing (/usr/lib/postgresql/*/bin). Install Debian's postgresql (apt-get install -y postgresql) or run as root.")
  console.log('▶ installing PostgreSQL (apt-get install -y postgresql)')
  const r = spawnSync('bash', ['-c', 'apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq postgresql'], { stdio: 'inherit' })
  if (r.status !== 0) throw new Error(`apt-get install postgresql failed (exit ${r.status})`)
  dir = binDir()
  if (!dir) throw new Error('postgresql installed, but no initdb under /usr/lib/postgresql/*/bin')
  return dir
}

function freePort() {
  return new Promise((resolve, reject) => {
    const s = createServer()
    s.unref()
    s.on('error', reject)
    s.listen(0, '127.0.0.1', () => { const { port } = s.address(); s.close(() => resolve(port)) })
  })
}

function asOwner(cmd, args) {
  // As root, run as postgres; otherwise as ourselves.
  const [file, argv] = isRoot() ? ['runuser', ['-u', 'postgres', '--', cmd, ...args]] : [cmd, args]
  return execFileSync(file, argv, { stdio: ['ignore', 'pipe', 'pipe'] }).toString()
}

/**
 * Starts a cluster. Returns { url, port, stop(), restart() }: url names the "postgres" database as the
 * superuser "umbrafield" (trust authentication on loopback only).
 */
export async function startPostgres() {
  const bin = ensurePostgres()
  const dir = mkdtempSync(join(tmpdir(), 'umbrafield-pg-'))
  chmodSync(dir, 0o777)
  const data = join(dir, 'data')
  if (isRoot()) execFileSync('chown', ['postgres', dir])
  const port = await freePort()
  try {
    asOwner(join(bin, 'initdb'), ['-D', data, '-U', 'umbrafield', '--auth=trust', '-E', 'UTF8', '--no-sync', '--locale=C'])
    asOwner(join(bin, 'pg_ctl'), ['-D', data, '-l', join(dir, 'server.log'), '-w', '-t', '60', '-o',
      `-p ${port} -k ${dir} -c listen_addresses=127.0.0.1 -c fsync=off -c synchronous_commit=off -c full_page_writes=off -c max_connections=200`, 'start'])
  } catch (e) {
    const log = existsSync(join(dir, 'server.log')) ? execFileSync('tail', ['-n', '30', join(dir, 'server.log')]).toString() : ''
    rmSync(dir, { recursive: true, force: true })
    throw new Error(`PostgreSQL did not start: ${(e.stderr?.toString() || e.message).trim()}\n${log}`, { cause: e })
  }
  const url = `postgres://umbrafield@127.0.0.1:${port}/postgres`
  let stopped = false
  const stop = () => {
    if (stopped) return
    stopped = true
    try { asOwner(join(bin, 'pg_ctl'), ['-D', data, '-m', 'immediate', '-w', 'stop']) } catch { /* already down */ }
    rmSync(dir, { recursive: true, force: true })
  }
  /** Restarts the server (pg_ctl restart, fast shutdown): every open connection is dropped. */
  const restart = () => asOwner(join(bin, 'pg_ctl'), ['-D', data, '-l', join(dir, 'server.log'), '-w', '-t', '60', '-m', 'fast', 'restart'])
  return { url, port, stop, restart }
}
