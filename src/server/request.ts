import type { APIContext } from 'astro';
import { env } from '../config';

/**
 * Facts about a request that security decisions rest on. None of them reads a header the
 * client chooses freely: the client address comes from our own server (scripts/serve.ts),
 * which drops X-Forwarded-* from any peer not listed in TRUST_PROXY and otherwise rewrites
 * X-Forwarded-For to the one address it determined; the scheme and origin come from
 * PUBLIC_URL. X-Forwarded-Proto and X-Forwarded-Host never decide anything here.
 */

/** The client's address, as our server determined it from the socket (and trusted proxies). */
export function clientIp(ctx: Pick<APIContext, 'clientAddress'>): string {
  try {
    return ctx.clientAddress ? ctx.clientAddress.slice(0, 64) : 'unknown';
  } catch {
    return 'unknown';
  }
}

function publicOrigin(publicUrl: string): URL {
  const url = new URL(publicUrl);
  if (url.protocol !== 'http:' && url.protocol !== 'https:') throw new Error(`PUBLIC_URL must be http or https, not ${url.protocol}`);
  return url;
}

/** Cookies must be Secure exactly when people reach Plateau over HTTPS, as PUBLIC_URL says. */
export function cookiesMustBeSecure(publicUrl: string = env().PUBLIC_URL): boolean {
  return publicOrigin(publicUrl).protocol === 'https:';
}

const LOOPBACK_NAMES = new Set(['localhost', '127.0.0.1', '[::1]']);

/**
 * The origins a state-changing request may come from: PUBLIC_URL's origin, plus the origin the
 * Host header names (with PUBLIC_URL's scheme) when that host is PUBLIC_URL's own host name,
 * on any port, or, for a loopback PUBLIC_URL, another loopback name (localhost / 127.0.0.1 /
 * [::1]), so a local browser on either spelling works. A foreign Host (DNS rebinding) adds
 * nothing.
 */
export function expectedOrigins(request: Request, publicUrl: string = env().PUBLIC_URL): string[] {
  const base = publicOrigin(publicUrl);
  const origins = [base.origin];
  const host = request.headers.get('host');
  if (!host) return origins;
  let fromHost: URL;
  try {
    fromHost = new URL(`${base.protocol}//${host}`);
  } catch {
    return origins;
  }
  // `host` must be a bare host[:port]: no credentials, path or query smuggled in.
  if (fromHost.host !== host.toLowerCase() && fromHost.host + `:${fromHost.protocol === 'https:' ? 443 : 80}` !== host.toLowerCase()) return origins;
  const sameName = fromHost.hostname === base.hostname;
  const bothLoopback = LOOPBACK_NAMES.has(fromHost.hostname) && LOOPBACK_NAMES.has(base.hostname);
  if ((sameName || bothLoopback) && !origins.includes(fromHost.origin)) origins.push(fromHost.origin);
  return origins;
}

/** True when the request's Origin (or, without one, its Referer's origin) is one we expect. */
export function isSameOrigin(request: Request, publicUrl: string = env().PUBLIC_URL): boolean {
  const source = request.headers.get('origin') ?? request.headers.get('referer');
  if (!source || source === 'null') return false;
  let origin: string;
  try {
    origin = new URL(source).origin;
  } catch {
    return false;
  }
  return expectedOrigins(request, publicUrl).includes(origin);
}
