/**
 * Where sign-in may send someone next, and which mail links carry a secret. The redirect
 * cases are the browser URL-parsing behaviours the WHATWG URL Standard specifies (a "\"
 * after the scheme-relative slash is read as "/", tabs and newlines are stripped), the usual
 * open-redirect bypasses listed in the OWASP Unvalidated Redirects and Forwards Cheat Sheet.
 */
import { describe, it, expect } from 'vitest';
import { readdirSync } from 'node:fs';
import { safeNextPath, PAGE_ROOTS, secretLinksIn, redactSecretLinks, LINK_REMOVED } from '../../src/lib/web';

const OURS = 'https://plateau.example:8443';

describe('safeNextPath', () => {
  it.each([
    ['/\\evil.example'],
    ['/\tevil.example'],
    ['/\t/evil.example'],
    ['/%5Cevil.example'],
    ['/%5c%5cevil.example'],
    ['//evil.example'],
    ['///evil.example'],
    ['/\\/evil.example'],
    ['https://evil.example'],
    ['https://plateau.example:8443.evil.example/'],
    ['http:evil.example'],
    ['javascript:alert(1)'],
    ['/%09/evil.example'],
    ['/\n/evil.example'],
    ['\\\\evil.example'],
    ['/api/account'],
    ['/sign-in'],
    ['/_astro/x.js'],
    [''],
    [null],
    [undefined],
    ['ferments'],
    ['/' + 'a'.repeat(600)],
  ])('refuses %j and answers /', (next) => {
    expect(safeNextPath(next as string | null | undefined, OURS)).toBe('/');
  });

  it.each([
    ['/', '/'],
    ['/ferments', '/ferments'],
    ['/ferments/12?tab=log', '/ferments/12?tab=log'],
    ['/board/day#still-2', '/board/day#still-2'],
    ['/settings/members', '/settings/members'],
    ['/runs/3/record', '/runs/3/record'],
    ['/reports?from=2026-11-01', '/reports?from=2026-11-01'],
  ])('keeps our page %j', (next, expected) => {
    expect(safeNextPath(next, OURS)).toBe(expected);
  });

  it('knows every signed-in top-level page on disk (a new page must be added to PAGE_ROOTS or be public)', () => {
    const PUBLIC = new Set(['sign-in', 'sign-up', 'confirm', 'invite', 'forgot-password', 'reset-password', '404', '500', '403', 'index', 'api']);
    const roots = readdirSync('src/pages')
      .map((f) => f.replace(/\.astro$/, ''))
      .filter((f) => !PUBLIC.has(f));
    const missing = roots.filter((r) => !(PAGE_ROOTS as readonly string[]).includes(r));
    expect(missing).toEqual([]);
  });
});

describe('secret links in mail', () => {
  const mail = `Hello,\nReset: https://plateau.example/reset-password/AbCdEfGhIjKlMnOpQrStUvWxYz0123456789-_abcd\nJoin: http://127.0.0.1:4321/invite/ZZZZZZZZZZZZZZZZZZZZ\nConfirm http://x.example/confirm/abcdefghijklmnop.\nBoard: https://plateau.example/board`;
  it('finds reset, invitation and confirmation links and nothing else', () => {
    expect(secretLinksIn(mail)).toEqual([
      'https://plateau.example/reset-password/AbCdEfGhIjKlMnOpQrStUvWxYz0123456789-_abcd',
      'http://127.0.0.1:4321/invite/ZZZZZZZZZZZZZZZZZZZZ',
      'http://x.example/confirm/abcdefghijklmnop',
    ]);
  });
  it('removes them and keeps the rest', () => {
    const out = redactSecretLinks(mail);
    expect(out).not.toMatch(/reset-password\/|invite\/|confirm\//);
    expect(out.split(LINK_REMOVED)).toHaveLength(4);
    expect(out).toContain('https://plateau.example/board');
  });
});
