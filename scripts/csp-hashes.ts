/**
 * After `astro build`: write dist/csp-hashes.json, the SHA-256 of every inline script the
 * built server can write into a page, read from the build itself rather than from pages:
 *   - the client directive scripts of the build (manifest.clientDirectives),
 *   - the component <script>s Vite inlined (manifest.inlinedScripts),
 *   - Astro's <astro-island> runtime, checked to be in the server bundle.
 * src/server/csp.ts loads the file once at start and allows exactly these.
 *
 * Usage: node --import tsx scripts/csp-hashes.ts [distDir]   (default: dist)
 */
import { readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import astroIsland from 'astro/runtime/server/astro-island.prebuilt.js';
import { CSP_HASHES_FILE, sha256Source, type BuildCspHashes } from '../src/server/csp';

const dist = path.resolve(process.argv[2] ?? 'dist');
const serverDir = path.join(dist, 'server');

function fail(message: string): never {
  console.error(`[csp-hashes] ${message}`);
  process.exit(1);
}

/** Every .mjs file of the server bundle, as text. */
function serverBundleText(): string {
  const out: string[] = [];
  const walk = (dir: string) => {
    for (const e of readdirSync(dir, { withFileTypes: true })) {
      const p = path.join(dir, e.name);
      if (e.isDirectory()) walk(p);
      else if (e.name.endsWith('.mjs')) out.push(readFileSync(p, 'utf8'));
    }
  };
  walk(serverDir);
  return out.join('\n');
}

const manifestFiles = readdirSync(serverDir).filter((f) => /^manifest_.*\.mjs$/.test(f));
if (manifestFiles.length !== 1) fail(`expected one manifest_*.mjs in ${serverDir}, found ${manifestFiles.length}: run astro build first`);
const { manifest } = (await import(pathToFileURL(path.join(serverDir, manifestFiles[0]!)).href)) as {
  manifest: { clientDirectives: Map<string, string>; inlinedScripts: Map<string, string> };
};
if (!(manifest?.clientDirectives instanceof Map) || !(manifest.inlinedScripts instanceof Map)) {
  fail('the build manifest has no clientDirectives / inlinedScripts maps (has the astro version changed?)');
}

const scripts: BuildCspHashes['scripts'] = [];
for (const [name, script] of manifest.clientDirectives) scripts.push({ source: `directive:${name}`, hash: sha256Source(script) });
for (const [id, script] of manifest.inlinedScripts) {
  if (!script) continue; // an empty inlined script is not rendered at all
  const file = path.relative(process.cwd(), id.split('?')[0]!);
  scripts.push({ source: `inlined:${file}`, hash: sha256Source(script) });
}
// The island runtime is bundled into the server from the same astro package; make sure it is this one.
const bundle = serverBundleText();
if (!bundle.includes(astroIsland.slice(0, 200)) && !bundle.includes(JSON.stringify(astroIsland).slice(1, 201))) {
  fail('the <astro-island> script in node_modules/astro differs from the one in the server bundle: rebuild');
}
scripts.push({ source: 'astro-island', hash: sha256Source(astroIsland) });

const astroVersion = (createRequire(import.meta.url)('astro/package.json') as { version: string }).version;
const out: BuildCspHashes = { astroVersion, scripts };
writeFileSync(path.join(dist, CSP_HASHES_FILE), `${JSON.stringify(out, null, 2)}\n`);
console.log(`[csp-hashes] ${scripts.length} inline scripts allowed (astro ${astroVersion}) -> ${path.join(dist, CSP_HASHES_FILE)}`);
