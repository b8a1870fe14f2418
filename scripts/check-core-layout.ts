// Layout check of the numerical core (shared/geometry): no import cycles, each concern folder
// imports only from the folders listed before it (README "Layout"), and file sizes.
// `npx tsx scripts/check-core-layout.ts` prints the findings; tests/unit/geometry/layout.test.ts runs it.
import { readFileSync, readdirSync, statSync } from 'node:fs'
import { dirname, join, relative, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'

/** Concern folders (and root files) in dependency order: each may import only from earlier ones and itself. */
export const CORE_ORDER = ['types.ts', 'math', 'adapters', 'mesh', 'io', 'validate', 'mass', 'gravity', 'contact', 'merge', 'neck', 'orbit', 'study', 'warm.ts', 'index.ts']

/** Relative imports and re-exports (type-only ones included) of every .ts file under `root`. */
function importGraph(root: string): Map<string, string[]> {
  const files: string[] = []
  const walk = (d: string) => {
    for (const f of readdirSync(d)) {
      const p = join(d, f)
      if (statSync(p).isDirectory()) walk(p)
      else if (p.endsWith('.ts')) files.push(p)
    }
  }
  walk(root)
  const edges = new Map<string, string[]>()
  for (const f of files) {
    const deps: string[] = []
    for (const m of readFileSync(f, 'utf8').matchAll(/^(?:import|export)\s[^'"]*?from\s+'(\.[^']+)'/gm)) {
      const base = resolve(dirname(f), m[1])
      const target = [`${base}.ts`, join(base, 'index.ts')].find(c => files.includes(c))
      if (!target) throw new Error(`${relative(root, f)}: unresolved import '${m[1]}'`)
      deps.push(target)
    }
    edges.set(f, deps)
  }
  return edges
}

/**
 * Checks the core under `root`. Returns { files, largest: [[lines, file]...] (descending),
 * cycles: ['a → b → a'...], upward: ['file imports later-folder file'...] }.
 */
export function checkCoreLayout(root: string): { files: number, largest: [number, string][], cycles: string[], upward: string[] } {
  const edges = importGraph(root)
  const name = (f: string) => relative(root, f).split('\\').join('/')
  const rank = (f: string) => {
    const top = name(f).split('/')[0]
    const r = CORE_ORDER.indexOf(top)
    if (r < 0) throw new Error(`${name(f)}: not in a known concern folder (add it to CORE_ORDER and the README)`)
    return r
  }
  const cycles: string[] = []
  const state = new Map<string, number>()
  const stack: string[] = []
  const visit = (f: string) => {
    state.set(f, 1)
    stack.push(f)
    for (const g of edges.get(f)!) {
      if (state.get(g) === 1) cycles.push([...stack.slice(stack.indexOf(g)), g].map(name).join(' → '))
      else if (!state.get(g)) visit(g)
    }
    stack.pop()
    state.set(f, 2)
  }
  for (const f of edges.keys()) if (!state.get(f)) visit(f)
  const upward: string[] = []
  for (const [f, deps] of edges) for (const g of deps) if (rank(g) > rank(f)) upward.push(`${name(f)} imports ${name(g)}`)
  const largest = [...edges.keys()].map((f): [number, string] => [readFileSync(f, 'utf8').split('\n').length - 1, name(f)]).sort((a, b) => b[0] - a[0])
  return { files: edges.size, largest, cycles, upward }
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const root = resolve(dirname(fileURLToPath(import.meta.url)), '../shared/geometry')
  const r = checkCoreLayout(root)
  console.info(`${r.files} files; largest: ${r.largest.slice(0, 3).map(([n, f]) => `${f} (${n} lines)`).join(', ')}`)
  for (const [n, f] of r.largest) if (n > 400) console.warn(`over 400 lines: ${f} (${n})`)
  console.info(r.cycles.length ? `import cycles:\n  ${r.cycles.join('\n  ')}` : 'no import cycles')
  console.info(r.upward.length ? `imports against the folder order:\n  ${r.upward.join('\n  ')}` : 'every folder imports only from earlier ones')
  process.exit(r.cycles.length || r.upward.length ? 1 : 0)
}
