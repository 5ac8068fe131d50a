// npm run --silent eclipse -- <list|local|path> [options]   — prints JSON on stdout.
import { readFileSync } from 'node:fs'
import { parseArgs } from 'node:util'
import { catalogue, computedElementsFor } from '../server/eclipse/catalogue'
import { localReport, pathReport } from '../server/eclipse/report'
import { PublishedElements } from '../shared/schemas/elements'
import type { BesselianElements } from '../shared/eclipse/types'

const USAGE = 'usage: eclipse list [--from Y --to Y] | local --eclipse DATE --lat N --lon N [--elev M] [--delta-t S] [--elements FILE] | path --eclipse DATE [--step S] [--delta-t S] [--elements FILE]'

class CliError extends Error {}

function num(v: string | undefined, name: string, min: number, max: number): number | undefined {
  if (v === undefined) return undefined
  const n = Number(v)
  if (v.trim() === '' || !Number.isFinite(n)) throw new CliError(`--${name} must be a number, got "${v}"`)
  if (n < min || n > max) throw new CliError(`--${name} must be between ${min} and ${max}, got ${n}`)
  return n
}

function elementsFor(id: string | undefined, file: string | undefined): BesselianElements {
  if (!id) throw new CliError('--eclipse DATE is required')
  if (!/^\d{4}-\d{2}-\d{2}$/.test(id)) throw new CliError(`--eclipse must be a date YYYY-MM-DD, got "${id}"`)
  if (file) {
    let raw: unknown
    try { raw = JSON.parse(readFileSync(file, 'utf8')) } catch (e) { throw new CliError(`cannot read --elements ${file}: ${(e as Error).message}`) }
    const r = PublishedElements.safeParse(raw)
    if (!r.success) { const i = r.error.issues[0]!; throw new CliError(`--elements ${file}: ${i.path.join('.') || 'body'}: ${i.message}`) }
    return { ...r.data, kind: 'published' }
  }
  const el = computedElementsFor(id)
  if (!el) throw new CliError(`no solar eclipse on ${id} (greatest eclipse date, UTC)`)
  return el
}

function main(argv: string[]): unknown {
  const [command, ...raw] = argv
  // Let negative numbers follow an option ("--lon -80.09"): node's parser would read them as options.
  const rest: string[] = []
  for (let i = 0; i < raw.length; i++) {
    const a = raw[i]!
    const next = raw[i + 1]
    if (a.startsWith('--') && !a.includes('=') && next !== undefined && /^-\d|^-\.\d/.test(next)) { rest.push(`${a}=${next}`); i++ }
    else rest.push(a)
  }
  const { values } = parseArgs({
    args: rest,
    options: {
      from: { type: 'string' }, to: { type: 'string' }, eclipse: { type: 'string' },
      lat: { type: 'string' }, lon: { type: 'string' }, elev: { type: 'string' },
      'delta-t': { type: 'string' }, elements: { type: 'string' }, step: { type: 'string' },
    },
    strict: true,
  })
  switch (command) {
    case 'list': {
      const from = num(values.from, 'from', 1900, 2100) ?? 1900
      const to = num(values.to, 'to', 1900, 2100) ?? 2100
      if (from > to) throw new CliError('--from must not be after --to')
      return catalogue().rows.filter((r) => { const y = Number(r.id.slice(0, 4)); return y >= from && y <= to })
    }
    case 'local': {
      const lat = num(values.lat, 'lat', -90, 90)
      const lon = num(values.lon, 'lon', -180, 180)
      if (lat === undefined || lon === undefined) throw new CliError('--lat and --lon are required')
      const el = elementsFor(values.eclipse, values.elements)
      return localReport(values.eclipse!, el, { latDeg: lat, lonDeg: lon, elevationM: num(values.elev, 'elev', -500, 9000) ?? 0 },
        num(values['delta-t'], 'delta-t', -50, 10000))
    }
    case 'path': {
      const el = elementsFor(values.eclipse, values.elements)
      const step = num(values.step, 'step', 1, 3600)
      return pathReport(values.eclipse!, el, { stepSec: step, deltaT: num(values['delta-t'], 'delta-t', -50, 10000) })
    }
    default:
      throw new CliError(command ? `unknown command "${command}". ${USAGE}` : USAGE)
  }
}

try {
  process.stdout.write(JSON.stringify(main(process.argv.slice(2))) + '\n')
} catch (e) {
  const msg = e instanceof CliError || (e as { code?: string }).code?.startsWith('ERR_PARSE_ARGS') ? (e as Error).message : `internal error: ${(e as Error).message}`
  process.stderr.write(`eclipse: ${msg.split('\n')[0]}\n`)
  process.exitCode = 2
}
