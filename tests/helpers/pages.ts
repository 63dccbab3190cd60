/**
 * The pages on disk, shared by the page authorization matrix (tests/integration/authz-pages.test.ts)
 * and the hostile-input suite for pages (tests/helpers/fuzz-pages-suite.ts): every .astro page
 * under src/pages outside api/, named by its URL pattern, and the query parameters each reads.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';

const PAGES_DIR = path.resolve('src/pages');
/** Error pages are answers, not destinations: 403 is reached by a refused role, 404/500 by Astro. */
export const ERROR_PAGES = new Set(['/403', '/404', '/500']);

/** src/pages/ferments/[id]/edit.astro -> /ferments/[id]/edit; index.astro -> its folder ('/' at the top). */
export function pagePattern(file: string): string {
  const parts = path
    .relative(PAGES_DIR, file)
    .split(path.sep)
    .join('/')
    .replace(/\.(astro|md|mdx|html)$/, '')
    .split('/');
  if (parts[parts.length - 1] === 'index') parts.pop();
  return '/' + parts.join('/');
}

function walk(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = path.join(dir, name);
    if (statSync(full).isDirectory()) {
      // api/ holds endpoints (their own matrix); Astro ignores folders starting with _.
      if (name.startsWith('_') || (dir === PAGES_DIR && name === 'api')) return [];
      return walk(full);
    }
    // Astro ignores files starting with _; a catch-all only answers 404.
    if (name.startsWith('_') || name.startsWith('[...') || !/\.(astro|md|mdx|html)$/.test(name)) return [];
    return [full];
  });
}

/** Every page on disk (error pages left out unless asked for), sorted by pattern. */
export function discoverPages(opts: { withErrorPages?: boolean } = {}): Array<{ page: string; file: string }> {
  return walk(PAGES_DIR)
    .map((file) => ({ page: pagePattern(file), file: path.relative(process.cwd(), file) }))
    .filter((p) => opts.withErrorPages || !ERROR_PAGES.has(p.page))
    .sort((a, b) => a.page.localeCompare(b.page));
}

/**
 * The query parameters a page reads, found in its source: `Astro.url.searchParams.get('x')`
 * (also getAll/has), directly or through a variable holding `Astro.url.searchParams`.
 * `readsAllEntries` is true when the page hands every entry to a schema
 * (`Object.fromEntries(Astro.url.searchParams…)`, `.entries()`): its keys are not in the source.
 */
export function pageQueryKeys(file: string): { keys: string[]; readsAllEntries: boolean } {
  const src = readFileSync(file, 'utf8');
  const holders = ['Astro\\.url\\.searchParams', ...[...src.matchAll(/\b(?:const|let)\s+(\w+)\s*=\s*Astro\.url\.searchParams\b/g)].map((m) => m[1]!)];
  const keys = new Set<string>();
  let readsAllEntries = false;
  for (const h of holders) {
    for (const m of src.matchAll(new RegExp(`${h}\\s*\\.\\s*(?:get|getAll|has)\\(\\s*['"\`]([^'"\`]+)['"\`]`, 'g'))) keys.add(m[1]!);
    if (new RegExp(`${h}\\s*\\.\\s*(?:entries|keys|forEach)\\(|Object\\.fromEntries\\(\\s*${h}\\b|\\[\\.\\.\\.\\s*${h}\\b`).test(src)) readsAllEntries = true;
  }
  return { keys: [...keys].sort(), readsAllEntries };
}

/**
 * Short words quoted in a page's frontmatter ('throttled', 'desc', 'active'…): values a query
 * parameter may be compared with, so generated queries reach the branches that use them.
 */
export function pageLiterals(file: string): string[] {
  const src = readFileSync(file, 'utf8');
  const front = src.startsWith('---') ? src.slice(3, src.indexOf('\n---', 3)) : '';
  const words = new Set<string>();
  for (const m of front.matchAll(/(['"])([\w.-]{1,40})\1/g)) if (!m[2]!.startsWith('.') && !m[2]!.includes('/')) words.add(m[2]!);
  return [...words].sort();
}
