import { z } from 'zod';
import type { APIContext } from 'astro';
import { signIn, SIGN_IN_EMAIL_COOKIE } from '../../../server/accounts';
import { setSessionCookie } from '../../../server/auth/session';
import { route, json, invalidResponse, HttpError } from '../../../server/http';
import { clientIp, cookiesMustBeSecure } from '../../../server/request';
import { safeNextPath, DEFAULT_NEXT } from '../../../lib/web';
import { env } from '../../../config';

const Body = z.object({
  email: z.string().trim().min(3, 'Enter your e-mail.').max(254).email('Enter a valid e-mail.'),
  password: z.string().min(1, 'Enter your password.').max(1000),
  next: z.string().max(500).optional(),
});

/** Back to the sign-in page with the reason, the page to go on to, and the e-mail kept for the next try. */
function backToSignIn(req: APIContext, raw: unknown, query: Record<string, string>): Response {
  const fields = (raw && typeof raw === 'object' ? raw : {}) as Record<string, unknown>;
  const email = typeof fields.email === 'string' ? fields.email.trim().slice(0, 254) : '';
  if (email) req.cookies.set(SIGN_IN_EMAIL_COOKIE, email, { path: '/sign-in', httpOnly: true, sameSite: 'lax', secure: cookiesMustBeSecure(), maxAge: 300 });
  const next = safeNextPath(typeof fields.next === 'string' ? fields.next : null, env().PUBLIC_URL);
  const params = new URLSearchParams(query);
  if (next !== DEFAULT_NEXT) params.set('next', next);
  return req.redirect(`/sign-in?${params.toString()}`, 303);
}

/**
 * Accepts JSON (islands, tests, the sign-in page's script) or a plain form post (the sign-in
 * page works without JS). The body is parsed here, not by route(), because a form post that
 * fails is sent back to the sign-in page (?error=invalid / credentials / throttled, the e-mail
 * kept) instead of a JSON 400 or 429.
 */
export const POST = route({ auth: 'public', body: z.unknown() }, async ({ req, body }) => {
  const isForm = /application\/x-www-form-urlencoded|multipart\/form-data/.test(req.request.headers.get('content-type') ?? '');
  const parsed = Body.safeParse(body);
  if (!parsed.success) return isForm ? backToSignIn(req, body, { error: 'invalid' }) : invalidResponse(parsed.error);
  try {
    const { session } = await signIn({ ...parsed.data, ip: clientIp(req), userAgent: req.request.headers.get('user-agent') });
    setSessionCookie(req.cookies, session.token);
    const next = safeNextPath(parsed.data.next, env().PUBLIC_URL);
    return isForm ? req.redirect(next, 303) : json({ ok: true, next });
  } catch (err) {
    if (err instanceof HttpError && isForm) {
      if (err.status === 429) return backToSignIn(req, body, { error: 'throttled', wait: String(err.extra?.retryAfter ?? 60) });
      if (err.status === 400) return backToSignIn(req, body, { error: 'credentials' });
    }
    throw err;
  }
});
