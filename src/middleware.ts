import { defineMiddleware } from 'astro:middleware';
import { lucia, SESSION_ABSOLUTE_MS, setSessionCookie, clearSessionCookie, sessionTokenFrom, sessionIdFor } from './server/auth/session';
import { cookiesMustBeSecure } from './server/request';
import { demoAllowed } from './config';
import { contentSecurityPolicy, BASE_SECURITY_HEADERS } from './server/csp';
import { jsonError } from './server/http';
import { isSameOrigin } from './server/request';
import { isDbUnavailable } from './server/db-errors';
import { forgetFingerprints } from './server/snapshot-cache';
import { startBackgroundJobs } from './server/jobs';
import { runStartupChecks } from './server/startup';

runStartupChecks();
// The production server (scripts/serve.ts) starts the background jobs; `astro dev` has no serve.ts.
if (import.meta.env.DEV) startBackgroundJobs();

/** Reachable without a session. Everything else needs one. */
const PUBLIC_PAGES = [
  /^\/sign-in\/?$/,
  /^\/sign-up\/?$/,
  /^\/confirm\//,
  /^\/invite\//,
  /^\/forgot-password\/?$/,
  /^\/reset-password\//,
  /^\/404\/?$/,
  /^\/500\/?$/,
];
const PUBLIC_API = [/^\/api\/health\/?$/, /^\/api\/auth\//, /^\/api\/feeds\/[^/]+\.ics$/];

const STATE_CHANGING = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/** The request's Origin (or Referer) must be PUBLIC_URL's origin (see expectedOrigins); no X-Forwarded-* header counts. */
function sameOrigin(request: Request): boolean {
  return isSameOrigin(request);
}

export const onRequest = defineMiddleware(async (ctx, next) => {
  const { request, url, locals, cookies } = ctx;
  const path = url.pathname;
  const isApi = path.startsWith('/api/');
  locals.user = null;
  locals.sessionId = null;
  locals.workspace = null;
  locals.role = null;
  locals.memberships = [];

  // CSRF: a state-changing request must come from our own origin.
  if (STATE_CHANGING.has(request.method) && !sameOrigin(request)) {
    return withHeaders(jsonError(403, 'cross_origin', 'Cross-origin request refused.'));
  }

  const isStatic = path.startsWith('/_astro/') || path === '/favicon.svg' || path.startsWith('/fonts/');
  if (!isStatic) {
    try {
      const token = sessionTokenFrom(cookies);
      if (token) {
        const { session, user } = await lucia().validateSession(sessionIdFor(token));
        const tooOld = session && Date.now() - new Date(session.createdAt).getTime() > SESSION_ABSOLUTE_MS;
        // Outside demo mode, the demo distillery's published sign-ins never open a session.
        const demoRefused = user && !demoAllowed() && user.memberships.some((m) => m.settings.isDemo);
        if (!session || !user || user.disabledAt || tooOld || demoRefused) {
          if (session) await lucia().invalidateSession(session.id);
          clearSessionCookie(cookies);
        } else {
          if (session.fresh) setSessionCookie(cookies, token);
          locals.user = { id: user.id, email: user.email, name: user.name };
          locals.sessionId = session.id;
          const mine = user.memberships;
          locals.memberships = mine.map(({ workspaceId, name, role }) => ({ workspaceId, name, role }));
          const chosen = mine.find((m) => m.workspaceId === session.workspaceId) ?? mine[0];
          if (chosen) {
            locals.workspace = chosen.settings;
            locals.role = chosen.role;
          }
        }
      }
    } catch (err) {
      if (isDbUnavailable(err)) {
        if (isApi) return withHeaders(jsonError(503, 'unavailable', 'The database is not answering; try again shortly.', undefined, { 'retry-after': '5' }));
        return withHeaders(new Response(unavailablePage(), { status: 503, headers: { 'content-type': 'text/html; charset=utf-8', 'retry-after': '5' } }));
      }
      throw err;
    }

    const isPublic = isApi ? PUBLIC_API.some((r) => r.test(path)) : PUBLIC_PAGES.some((r) => r.test(path));
    if (!isPublic && !locals.user && !isApi) {
      return withHeaders(ctx.redirect(`/sign-in?next=${encodeURIComponent(path + url.search)}`, 303));
    }
  }

  let response: Response;
  try {
    response = await next();
  } catch (err) {
    if (isApi)
      return withHeaders(jsonError(isDbUnavailable(err) ? 503 : 500, isDbUnavailable(err) ? 'unavailable' : 'internal', 'Something went wrong on our side.'));
    throw err;
  } finally {
    // Whatever a write touched, this process's remembered fingerprints may now be out of date.
    if (STATE_CHANGING.has(request.method)) forgetFingerprints();
  }
  // An /api path that fell through to the HTML 404 page (e.g. an id that cannot be routed) answers JSON.
  if (isApi && response.status === 404 && (response.headers.get('content-type') ?? '').includes('text/html')) {
    return withHeaders(jsonError(404, 'not_found', 'No such API route.'));
  }
  return withHeaders(response, isStatic);
});

/** Sent on every response, redirects and errors included; HSTS only when we are served over HTTPS. */
function securityHeaders(): Record<string, string> {
  return cookiesMustBeSecure() ? { ...BASE_SECURITY_HEADERS, 'strict-transport-security': 'max-age=31536000; includeSubDomains' } : BASE_SECURITY_HEADERS;
}

const NOTHING_ALLOWED = "default-src 'none'; frame-ancestors 'none'";

/**
 * Security headers on a response. An HTML page gets the page policy (the same for every page,
 * so the body is streamed through unread); anything else gets a policy that allows nothing.
 */
function withHeaders(response: Response, isStatic = false): Response {
  const html = !isStatic && (response.headers.get('content-type') ?? '').includes('text/html');
  const csp = html ? contentSecurityPolicy() : NOTHING_ALLOWED;
  try {
    for (const [k, v] of Object.entries(securityHeaders())) if (!response.headers.has(k)) response.headers.set(k, v);
    if (html) response.headers.set('content-security-policy', csp);
    else if (!response.headers.has('content-security-policy')) response.headers.set('content-security-policy', csp);
    return response;
  } catch {
    // Immutable headers (e.g. a fetched response): copy.
    const headers = new Headers(response.headers);
    for (const [k, v] of Object.entries(securityHeaders())) if (!headers.has(k)) headers.set(k, v);
    if (html || !headers.has('content-security-policy')) headers.set('content-security-policy', csp);
    return new Response(response.body, { status: response.status, statusText: response.statusText, headers });
  }
}

function unavailablePage(): string {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width"><title>Plateau — back shortly</title></head><body style="font-family:sans-serif;padding:2rem"><h1>Back in a moment</h1><p>Plateau cannot reach its database right now. Your readings and bookings are safe; this page will work again as soon as the database answers. Try again in a few seconds.</p></body></html>`;
}
