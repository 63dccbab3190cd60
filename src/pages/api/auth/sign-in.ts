import { z } from 'zod';
import { signIn } from '../../../server/accounts';
import { setSessionCookie } from '../../../server/auth/session';
import { route, json, invalidResponse, HttpError } from '../../../server/http';
import { clientIp } from '../../../server/request';
import { safeNextPath } from '../../../lib/web';
import { env } from '../../../config';

const Body = z.object({
  email: z.string().trim().min(3, 'Enter your e-mail.').max(254).email('Enter a valid e-mail.'),
  password: z.string().min(1, 'Enter your password.').max(1000),
  next: z.string().max(500).optional(),
});

/**
 * Accepts JSON (islands, tests) or a plain form post (the sign-in page works without JS). The
 * body is parsed here, not by route(), because a form post that fails is sent back to the
 * sign-in page (?error=invalid / credentials / throttled) instead of a JSON 400 or 429.
 */
export const POST = route({ auth: 'public', body: z.unknown() }, async ({ req, body }) => {
  const isForm = /application\/x-www-form-urlencoded|multipart\/form-data/.test(req.request.headers.get('content-type') ?? '');
  const parsed = Body.safeParse(body);
  if (!parsed.success) return isForm ? req.redirect('/sign-in?error=invalid', 303) : invalidResponse(parsed.error);
  try {
    const { session } = await signIn({ ...parsed.data, ip: clientIp(req), userAgent: req.request.headers.get('user-agent') });
    setSessionCookie(req.cookies, session.token);
    const next = safeNextPath(parsed.data.next, env().PUBLIC_URL);
    return isForm ? req.redirect(next, 303) : json({ ok: true, next });
  } catch (err) {
    if (err instanceof HttpError && isForm) {
      if (err.status === 429) return req.redirect(`/sign-in?error=throttled&wait=${err.extra?.retryAfter ?? 60}`, 303);
      if (err.status === 400) return req.redirect('/sign-in?error=credentials', 303);
    }
    throw err;
  }
});
