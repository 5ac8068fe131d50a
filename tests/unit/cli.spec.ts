import { spawnSync } from 'node:child_process'
import { writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { describe, expect, it } from 'vitest'
import { canonSet } from './reference'

const root = resolve(__dirname, '../..')
function cli(...args: string[]) {
  const r = spawnSync(process.execPath, ['--import', 'tsx', 'scripts/eclipse-cli.ts', ...args], { cwd: root, encoding: 'utf8' })
  return { code: r.status, out: r.stdout, err: r.stderr }
}

describe('npm run eclipse (command line)', () => {
  it('list gives the 1900–2100 catalogue rows', () => {
    const r = cli('list', '--from', '2024', '--to', '2024')
    expect(r.code).toBe(0)
    const rows = JSON.parse(r.out)
    expect(rows.map((x: { id: string }) => x.id)).toEqual(['2024-04-08', '2024-10-02'])
    expect(Object.keys(rows[0]).sort()).toEqual(['centralDurationSec', 'deltaTSec', 'gamma', 'greatest', 'id', 'magnitude', 'pathWidthKm', 'sunAltitudeDeg', 'type'])
    expect(rows[0].type).toBe('total')
    expect(rows[1].type).toBe('annular')
  })

  it('local with published elements and the publisher\'s ΔT matches evaluating them directly', () => {
    // Source: Five Millennium Canon elements for 2024-04-08 (Espenak & Meeus, NASA/TP-2006-214141).
    const { kind: _kind, ...set } = canonSet('2024-04-08')
    const file = join(tmpdir(), 'canon-2024.json')
    writeFileSync(file, JSON.stringify(set))
    const r = cli('local', '--eclipse', '2024-04-08', '--lat', '42.13', '--lon', '-80.09', '--elev', '15', '--delta-t', '72.8', '--elements', file)
    expect(r.code).toBe(0)
    const o = JSON.parse(r.out)
    expect(o.type).toBe('total')
    for (const k of ['c1', 'c2', 'max', 'c3', 'c4']) expect(o[k].utc).toMatch(/^2024-04-08T\d\d:\d\d:\d\d\.\dZ$/)
    expect(o.elementsSource).toMatch(/Canon/)
    expect(o.deltaTSec).toBe(72.8)
    // Erie, Pennsylvania: about 3m42s of totality south of the centreline (NASA's 2024 tables, from memory)
    // Bound: the engine's own stated ± for C2 and C3 (uncertaintySec, one sigma each, added as a worst case since
    // duration is C3 − C2), plus half a second for the tables' whole-second rounding.
    expect(Math.abs(o.durationSec - (3 * 60 + 42))).toBeLessThanOrEqual(o.uncertaintySec.c2 + o.uncertaintySec.c3 + 0.5)
    expect(o.centrelineDistanceKm).toBeLessThan(0)
    expect(o.uncertaintySec.c2).toBeGreaterThan(o.uncertaintySec.c1)
  })

  it('path prints GeoJSON with ticks at whole multiples of the step', () => {
    const r = cli('path', '--eclipse', '2027-08-02', '--step', '600')
    const fc = JSON.parse(r.out)
    const ticks = fc.features.filter((f: { properties: { kind: string } }) => f.properties.kind === 'tick')
    expect(ticks.length).toBeGreaterThan(20)
    for (const t of ticks) {
      expect(t.properties.utc).toMatch(/:[0-5]0:00\.0Z$/)
      expect(['centre', 'north', 'south']).toContain(t.properties.line)
      expect(typeof t.properties.sunAltitudeDeg).toBe('number')
      expect(t.properties.pathWidthKm).toBeGreaterThan(200) // on the centre and on both limits
    }
    expect(ticks.filter((t: { properties: { line: string } }) => t.properties.line === 'centre').every((t: { properties: { durationSec: number } }) => t.properties.durationSec > 0)).toBe(true)
  })

  it.each([
    [['local', '--eclipse', '2024-04-08', '--lat', '100', '--lon', '0'], /--lat must be between/],
    [['local', '--eclipse', '2024-04-09', '--lat', '1', '--lon', '0'], /no solar eclipse/],
    [['path'], /--eclipse DATE is required/],
    [['frobnicate'], /unknown command/],
    [['local', '--eclipse', '2024-04-08', '--lat', 'x', '--lon', '0'], /must be a number/],
  ])('bad arguments exit non-zero with one line: %j', (args, msg) => {
    const r = cli(...args)
    expect(r.code).not.toBe(0)
    expect(r.err.trim().split('\n')).toHaveLength(1)
    expect(r.err).toMatch(msg)
  })
})
