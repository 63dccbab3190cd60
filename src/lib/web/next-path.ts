/**
 * Where to send someone after signing in. The `next` value comes from the URL, so it is
 * untrusted: it is resolved against our own public address and accepted only when the
 * result is on our origin and under one of the app's own page roots. Anything else
 * (another host, `//host`, `/\host`, a tab or an encoded backslash after the slash, an API
 * path, a scheme) falls back to the board.
 */
export const PAGE_ROOTS = ['board', 'ferments', 'runs', 'reports', 'settings', 'vessels', 'account', 'setup'] as const;

export const DEFAULT_NEXT = '/';

export function safeNextPath(next: string | null | undefined, publicUrl: string): string {
  if (!next || next.length > 500) return DEFAULT_NEXT;
  // Only a plain absolute path is considered: no scheme, no backslash, no control characters
  // (browsers strip tabs and newlines and read "\" as "/" before resolving).
  // eslint-disable-next-line no-control-regex -- control characters in a redirect target are exactly what is refused
  if (!next.startsWith('/') || /[\\\u0000-\u001f\u007f]/.test(next) || /%(5c|2f|09|0a|0d|00)/i.test(next.slice(0, 4))) return DEFAULT_NEXT;
  let ours: URL;
  let target: URL;
  try {
    ours = new URL(publicUrl);
    target = new URL(next, ours);
  } catch {
    return DEFAULT_NEXT;
  }
  if (target.origin !== ours.origin) return DEFAULT_NEXT;
  if (/[\\]|%5c/i.test(target.pathname)) return DEFAULT_NEXT;
  const first = target.pathname.split('/')[1] ?? '';
  if (target.pathname !== '/' && !(PAGE_ROOTS as readonly string[]).includes(first)) return DEFAULT_NEXT;
  return target.pathname + target.search + target.hash;
}
