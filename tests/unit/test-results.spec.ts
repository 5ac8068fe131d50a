import { spawnSync } from 'node:child_process'
import { mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { countPlaywright, countVitest } from '../../scripts/test-results.mjs'

// npm test must fail when a test is left out. This runs vitest, as scripts/test.mjs does, on a
// throwaway suite with a todo, a skip and a focused test, and checks the counting sees each of them.
const root = resolve(__dirname, '../..')
const dir = mkdtempSync(join(tmpdir(), 'uf-selfcheck-'))
afterAll(() => rmSync(dir, { recursive: true, force: true }))

describe('what npm test counts as not run', () => {
  it('a todo and a skip count as not run; a .only fails its file (--allowOnly=false)', () => {
    // The throwaway suite imports vitest through a link to this project's node_modules.
    symlinkSync(join(root, 'node_modules'), join(dir, 'node_modules'), 'dir')
    const todo = 'it.' + 'todo'
    const only = 'it.' + 'only'
    writeFileSync(join(dir, 'left-out.spec.ts'), `import { expect, it } from 'vitest'\nit('runs', () => { expect(1).toBe(1) })\n${todo}('written later')\nit.skip('skipped', () => {})\n`)
    writeFileSync(join(dir, 'focused.spec.ts'), `import { expect, it } from 'vitest'\n${only}('focused', () => { expect(1).toBe(1) })\nit('left out by the focus', () => { expect(1).toBe(1) })\n`)
    const out = join(dir, 'report.json')
    const r = spawnSync(process.execPath, [join(root, 'node_modules/vitest/vitest.mjs'), 'run', '--root', dir, '--allowOnly=false', '--reporter=json', `--outputFile.json=${out}`], { cwd: dir, encoding: 'utf8', timeout: 120_000 })
    expect(r.status, r.stderr).not.toBe(0)
    const counted = countVitest(JSON.parse(readFileSync(out, 'utf8')))
    expect(counted.passed).toBe(1)
    expect(counted.todo).toBe(1)
    // The todo, the skip, and the test the focus left out.
    expect(counted.notRun).toBe(3)
    expect(counted.failed).toBeGreaterThanOrEqual(1)
  })

  it('Playwright: skipped and flaky tests are not clean passes', () => {
    expect(countPlaywright({ stats: { expected: 4, unexpected: 0, skipped: 1, flaky: 1 } })).toEqual({ passed: 4, failed: 1, notRun: 1 })
  })
})
