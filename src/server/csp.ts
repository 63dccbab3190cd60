import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
// Astro's own inline scripts, the very strings its renderer writes into <script> tags
// (runtime/server/scripts.js): the <astro-island> element and one script per client directive.
import astroIsland from 'astro/runtime/server/astro-island.prebuilt.js';
import astroIslandDev from 'astro/runtime/server/astro-island.prebuilt-dev.js';
import directiveIdle from 'astro/client/idle.prebuilt.js';
import directiveLoad from 'astro/client/load.prebuilt.js';
import directiveMedia from 'astro/client/media.prebuilt.js';
import directiveOnly from 'astro/client/only.prebuilt.js';
import directiveVisible from 'astro/client/visible.prebuilt.js';

/**
 * Content-Security-Policy for HTML pages: scripts only from our origin, plus a fixed list of
 * inline scripts allowed by their SHA-256. The list is known before any page is rendered:
 * Astro's hydration runtime (above, from the installed astro package) and what the build
 * inlined (dist/csp-hashes.json, written by scripts/csp-hashes.ts after `astro build`: the
 * small component <script>s Vite inlined and the client directives of the build). Nothing is
 * taken from the page being served, so a script that found its way into a page is blocked.
 * Inline styles are allowed (React style attributes need them).
 */

/** What scripts/csp-hashes.ts writes next to the build. */
export interface BuildCspHashes {
  astroVersion: string;
  scripts: Array<{ source: string; hash: string }>;
}

export const CSP_HASHES_FILE = 'csp-hashes.json';

export function sha256Source(script: string): string {
  return `'sha256-${createHash('sha256').update(script, 'utf8').digest('base64')}'`;
}

/** Astro's runtime snippets, hashed from the installed package. */
export const ASTRO_RUNTIME_SCRIPTS: ReadonlyArray<{ source: string; script: string }> = [
  { source: 'astro-island', script: astroIsland },
  { source: 'astro-island (dev)', script: astroIslandDev },
  { source: 'directive:idle', script: directiveIdle },
  { source: 'directive:load', script: directiveLoad },
  { source: 'directive:media', script: directiveMedia },
  { source: 'directive:only', script: directiveOnly },
  { source: 'directive:visible', script: directiveVisible },
];

/** dist/csp-hashes.json: beside the server bundle (found by walking up from this module), else under the working directory. */
function findBuildHashesFile(): string | null {
  const candidates: string[] = [];
  if (process.env.PLATEAU_CSP_HASHES) candidates.push(process.env.PLATEAU_CSP_HASHES);
  try {
    let dir = path.dirname(fileURLToPath(import.meta.url));
    for (let i = 0; i < 5; i++) {
      candidates.push(path.join(dir, CSP_HASHES_FILE));
      dir = path.dirname(dir);
    }
  } catch {
    /* not a file: URL */
  }
  candidates.push(path.join(process.cwd(), 'dist', CSP_HASHES_FILE));
  return candidates.find((c) => existsSync(c)) ?? null;
}

const HASH_SOURCE = /^'sha256-[A-Za-z0-9+/]{43}='$/;

export function parseBuildHashes(text: string): string[] {
  const data = JSON.parse(text) as BuildCspHashes;
  if (!Array.isArray(data.scripts)) throw new Error('csp-hashes.json: no scripts list');
  return data.scripts.map((s) => {
    if (!HASH_SOURCE.test(s.hash)) throw new Error(`csp-hashes.json: not a SHA-256 source: ${s.hash}`);
    return s.hash;
  });
}

let warned = false;

function loadBuildHashes(): string[] {
  // The dev server serves component scripts as modules from our origin: nothing is inlined.
  if (import.meta.env?.DEV) return [];
  const file = findBuildHashesFile();
  if (!file) {
    if (!warned && import.meta.env?.PROD) {
      warned = true;
      console.warn(
        `[csp] ${CSP_HASHES_FILE} not found next to the build: inline component scripts will be blocked. Run scripts/csp-hashes.ts after astro build.`,
      );
    }
    return [];
  }
  return parseBuildHashes(readFileSync(file, 'utf8'));
}

let policy: string | null = null;

/** The script hashes every HTML page may use (computed once). */
export function allowedScriptHashes(): string[] {
  return [...new Set([...ASTRO_RUNTIME_SCRIPTS.map((s) => sha256Source(s.script)), ...loadBuildHashes()])];
}

export function contentSecurityPolicy(): string {
  policy ??= [
    "default-src 'self'",
    `script-src 'self' ${allowedScriptHashes().join(' ')}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data:",
    "font-src 'self'",
    "connect-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "frame-ancestors 'none'",
    "form-action 'self'",
  ].join('; ');
  return policy;
}

/**
 * The policy for an HTML page. The page is not read: the same list of Astro's own scripts
 * applies to every page (the parameter stays for the middleware's call).
 */
export function cspForHtml(_html?: string): string {
  return contentSecurityPolicy();
}

export const BASE_SECURITY_HEADERS: Record<string, string> = {
  'x-content-type-options': 'nosniff',
  'referrer-policy': 'same-origin',
  'x-frame-options': 'DENY',
  'permissions-policy': 'camera=(), microphone=(), geolocation=()',
};
