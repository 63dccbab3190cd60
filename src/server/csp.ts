import { createHash } from 'node:crypto';

/**
 * Content-Security-Policy for an HTML page: scripts only from our origin, plus the
 * inline scripts Astro writes to hydrate islands, allowed one by one by their SHA-256.
 * Inline styles are allowed (React style attributes need them).
 */
export function cspForHtml(html: string): string {
  const hashes = new Set<string>();
  const re = /<script(?![^>]*\bsrc=)([^>]*)>([\s\S]*?)<\/script>/gi;
  for (let m = re.exec(html); m; m = re.exec(html)) {
    const attrs = m[1] ?? '';
    if (/type=["']?application\/(ld\+)?json/i.test(attrs)) continue;
    const body = m[2] ?? '';
    hashes.add(`'sha256-${createHash('sha256').update(body, 'utf8').digest('base64')}'`);
  }
  return [
    "default-src 'self'",
    `script-src 'self' ${[...hashes].join(' ')}`.trim(),
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data:",
    "font-src 'self'",
    "connect-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "frame-ancestors 'none'",
    "form-action 'self'",
  ].join('; ');
}

export const BASE_SECURITY_HEADERS: Record<string, string> = {
  'x-content-type-options': 'nosniff',
  'referrer-policy': 'same-origin',
  'x-frame-options': 'DENY',
  'permissions-policy': 'camera=(), microphone=(), geolocation=()',
};
