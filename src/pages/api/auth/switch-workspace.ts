import { z } from 'zod';
import { route, json } from '../../../server/http';
import { switchWorkspace } from '../../../server/accounts';

const Body = z.object({ workspaceId: z.coerce.number().int().positive() });

/** The header's distillery switcher posts a form here (answered 303 back to the page); islands and tests may send JSON. */
export const POST = route({ auth: 'user', body: Body }, async ({ req, me, body }) => {
  await switchWorkspace(me, body.workspaceId);
  const isForm = /application\/x-www-form-urlencoded|multipart\/form-data/.test(req.request.headers.get('content-type') ?? '');
  if (isForm) {
    const back = req.request.headers.get('referer');
    let to = '/';
    try {
      if (back) {
        const u = new URL(back);
        if (u.host === req.url.host) to = u.pathname + u.search;
      }
    } catch {
      /* keep / */
    }
    return req.redirect(to, 303);
  }
  return json({ ok: true, workspaceId: body.workspaceId });
});
