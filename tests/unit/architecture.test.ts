/**
 * Architecture guard: the layer rules in docs/ARCHITECTURE.md, checked on the files on disk.
 * Each rule fails with the list of offending files and imports.
 *  - src/lib is pure: it imports nothing from src/server, src/db, Astro or a database driver.
 *  - islands (React components) import no server or database module.
 *  - no import cycles anywhere in src/.
 */
import { describe, it, expect } from 'vitest';
import { readdirSync, readFileSync, statSync, existsSync } from 'node:fs';
import path from 'node:path';

const ROOT = path.resolve('src');

function walk(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = path.join(dir, name);
    return statSync(full).isDirectory() ? walk(full) : /\.(ts|tsx|astro|mjs)$/.test(name) && !name.endsWith('.d.ts') ? [full] : [];
  });
}

/** Module specifiers of a file's static and dynamic imports and re-exports (type-only imports too: they still couple layers). */
export function importsOf(source: string): string[] {
  const code = source.replace(/\/\*[\s\S]*?\*\//g, '').replace(/^\s*\/\/.*$/gm, '');
  const specs = new Set<string>();
  for (const re of [
    /\bimport\s+(?:type\s+)?[^'";]*?\s+from\s+['"]([^'"]+)['"]/g,
    /\bimport\s+['"]([^'"]+)['"]/g,
    /\bexport\s+(?:type\s+)?[^'";]*?\s+from\s+['"]([^'"]+)['"]/g,
    /\bimport\(\s*['"]([^'"]+)['"]\s*\)/g,
  ]) {
    for (const m of code.matchAll(re)) specs.add(m[1]!);
  }
  return [...specs];
}

/** A relative or `@/` specifier resolved to a file under src/, or null for a package. */
export function resolveImport(fromFile: string, spec: string): string | null {
  let base: string;
  if (spec.startsWith('@/')) base = path.join(ROOT, spec.slice(2));
  else if (spec.startsWith('.')) base = path.resolve(path.dirname(fromFile), spec);
  else return null;
  for (const candidate of [base, `${base}.ts`, `${base}.tsx`, `${base}.mjs`, path.join(base, 'index.ts'), base.replace(/\.js$/, '.ts')]) {
    if (existsSync(candidate) && statSync(candidate).isFile()) return candidate;
  }
  return null;
}

const files = walk(ROOT);
const rel = (f: string) => path.relative(process.cwd(), f);
const graph = new Map<string, string[]>();
for (const file of files) {
  const specs = importsOf(readFileSync(file, 'utf8'));
  graph.set(
    file,
    specs.map((s) => resolveImport(file, s) ?? `pkg:${s}`),
  );
}

/** Every strongly connected group of more than one file (or a file importing itself): the import cycles. */
export function cyclesIn(g: Map<string, string[]>): string[][] {
  let index = 0;
  const idx = new Map<string, number>();
  const low = new Map<string, number>();
  const stack: string[] = [];
  const on = new Set<string>();
  const out: string[][] = [];
  const visit = (v: string) => {
    idx.set(v, index);
    low.set(v, index);
    index++;
    stack.push(v);
    on.add(v);
    for (const w of g.get(v) ?? []) {
      if (!g.has(w)) continue;
      if (!idx.has(w)) {
        visit(w);
        low.set(v, Math.min(low.get(v)!, low.get(w)!));
      } else if (on.has(w)) low.set(v, Math.min(low.get(v)!, idx.get(w)!));
    }
    if (low.get(v) === idx.get(v)) {
      const group: string[] = [];
      let w: string;
      do {
        w = stack.pop()!;
        on.delete(w);
        group.push(w);
      } while (w !== v);
      if (group.length > 1 || (g.get(v) ?? []).includes(v)) out.push(group.sort());
    }
  };
  for (const v of g.keys()) if (!idx.has(v)) visit(v);
  return out;
}

const FORBIDDEN_IN_LIB = [/^pkg:astro(:|\/|$)/, /^pkg:drizzle-orm/, /^pkg:mysql2/, /^pkg:nodemailer/, /^pkg:lucia/, /^pkg:@node-rs\/argon2/, /^pkg:node:fs/];

describe('architecture', () => {
  it('finds the source files', () => {
    expect(files.length).toBeGreaterThan(100);
    expect(graph.get(path.join(ROOT, 'server/http.ts'))).toContain(path.join(ROOT, 'server/authz.ts'));
  });

  it('src/lib imports nothing from src/server, src/db, Astro or a database, mail or auth package', () => {
    const bad: string[] = [];
    for (const [file, deps] of graph) {
      if (!file.startsWith(path.join(ROOT, 'lib') + path.sep)) continue;
      for (const d of deps) {
        const inner =
          d.startsWith(path.join(ROOT, 'server') + path.sep) ||
          d.startsWith(path.join(ROOT, 'db') + path.sep) ||
          d.startsWith(path.join(ROOT, 'pages') + path.sep) ||
          d.startsWith(path.join(ROOT, 'components') + path.sep);
        if (inner || FORBIDDEN_IN_LIB.some((re) => re.test(d))) bad.push(`${rel(file)} -> ${d.startsWith('pkg:') ? d.slice(4) : rel(d)}`);
      }
    }
    expect(bad, `src/lib must stay pure:\n  ${bad.join('\n  ')}`).toEqual([]);
  });

  it('islands (React components) import no server or database module', () => {
    const bad: string[] = [];
    for (const [file, deps] of graph) {
      if (!file.startsWith(path.join(ROOT, 'components') + path.sep) || !/\.tsx?$/.test(file)) continue;
      for (const d of deps) {
        if (
          d.startsWith(path.join(ROOT, 'server') + path.sep) ||
          d.startsWith(path.join(ROOT, 'db') + path.sep) ||
          /^pkg:(drizzle-orm|mysql2|nodemailer|lucia)/.test(d)
        )
          bad.push(`${rel(file)} -> ${d.startsWith('pkg:') ? d.slice(4) : rel(d)}`);
      }
    }
    expect(bad, `islands run in the browser:\n  ${bad.join('\n  ')}`).toEqual([]);
  });

  it('has no import cycles in src/', () => {
    const cycles = cyclesIn(graph).map((c) => c.map(rel).join(' <-> '));
    expect(cycles, `import cycles:\n  ${cycles.join('\n  ')}`).toEqual([]);
  });

  it.each([
    [
      'a two-file cycle',
      new Map([
        ['a', ['b']],
        ['b', ['a']],
      ]),
      1,
    ],
    [
      'a three-file cycle beside a tree',
      new Map([
        ['a', ['b']],
        ['b', ['c']],
        ['c', ['a']],
        ['d', ['a']],
      ]),
      1,
    ],
    [
      'a tree',
      new Map([
        ['a', ['b', 'c']],
        ['b', ['c']],
        ['c', []],
      ]),
      0,
    ],
    ['a file importing itself', new Map([['a', ['a']]]), 1],
  ])('the cycle finder sees %s', (_name, g, n) => {
    expect(cyclesIn(g as Map<string, string[]>)).toHaveLength(n);
  });

  it.each([
    ["import { a } from './x';", ['./x']],
    ["import type { A } from '../y';", ['../y']],
    ["export { b } from './z';", ['./z']],
    ["const m = await import('./lazy');", ['./lazy']],
    ["import './side-effect';", ['./side-effect']],
    ["// import { no } from './commented';", []],
  ])('reads the imports of %j', (src, expected) => {
    expect(importsOf(src)).toEqual(expected);
  });
});
