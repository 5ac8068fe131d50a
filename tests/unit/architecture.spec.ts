import { readdirSync, readFileSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { describe, expect, it } from 'vitest'

// The services must form no import cycle (type-only imports included): each can be understood,
// tested and loaded on its own.
describe('server/services', () => {
  it('has no import cycles', () => {
    const dir = resolve(__dirname, '../../server/services')
    const files = readdirSync(dir).filter((f) => f.endsWith('.ts')).map((f) => f.replace(/\.ts$/, ''))
    const edges = new Map<string, string[]>()
    for (const f of files) {
      const text = readFileSync(join(dir, `${f}.ts`), 'utf8')
      edges.set(f, [...text.matchAll(/from '\.\/([\w-]+)'/g)].map((m) => m[1]!).filter((t) => files.includes(t)))
    }
    const cycles: string[] = []
    const state = new Map<string, 'open' | 'done'>()
    const visit = (n: string, path: string[]) => {
      if (state.get(n) === 'done') return
      if (state.get(n) === 'open') { cycles.push([...path.slice(path.indexOf(n)), n].join(' → ')); return }
      state.set(n, 'open')
      for (const m of edges.get(n) ?? []) visit(m, [...path, n])
      state.set(n, 'done')
    }
    for (const f of files) visit(f, [])
    expect(cycles).toEqual([])
  })
})
