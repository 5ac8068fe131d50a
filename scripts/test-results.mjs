// Counts what a test run did, from the JSON reports of vitest and Playwright, for scripts/test.mjs.
// Anything that did not run — skipped, todo, pending, or a Playwright test that was never reached —
// counts as "not run", and npm test fails on it just as on a failure.

/**
 * A vitest JSON report (`--reporter=json`): counted per test from its assertion results, so a todo
 * (status "todo") counts as not run even where the summary fields lump it elsewhere or leave it out.
 * A file that failed before its tests ran (a `.only` refused by `--allowOnly=false`, a syntax error)
 * counts as a failure.
 * @param {any} report
 * @returns {{ passed: number, failed: number, notRun: number, todo: number }}
 */
export function countVitest(report) {
  let passed = 0, failed = 0, notRun = 0, todo = 0
  for (const file of report.testResults ?? []) {
    const tests = file.assertionResults ?? []
    if (file.status === 'failed' && !tests.some((t) => t.status === 'failed')) failed++
    for (const t of tests) {
      if (t.status === 'passed') passed++
      else if (t.status === 'failed') failed++
      else { notRun++; if (t.status === 'todo') todo++ }
    }
  }
  return { passed, failed, notRun, todo }
}

/**
 * A Playwright JSON report: `stats.expected` passed, `unexpected` failed, and `skipped` plus `flaky`
 * (passed only on a retry) are not clean passes either.
 * @param {any} report
 * @returns {{ passed: number, failed: number, notRun: number }}
 */
export function countPlaywright(report) {
  const s = report.stats ?? {}
  return { passed: s.expected ?? 0, failed: (s.unexpected ?? 0) + (s.flaky ?? 0), notRun: s.skipped ?? 0 }
}
