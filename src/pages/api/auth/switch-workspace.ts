import type { APIRoute } from 'astro';
import { z } from 'zod';
import { errorResponse, json, jsonError } from '../../../server/http';
import { readInput, parseOrThrow, switchWorkspace } from '../../../server/accounts';

const Body = z.object({ workspaceId: z.coerce.number().int().positive() });

/** The header's distillery switcher posts a form here; islands and tests may send JSON. */
export const POST: APIRoute = async (ctx) => {
  try {
    const { user, sessionId } = ctx.locals;
    if (!user || !sessionId) return jsonError(401, 'unauthenticated', 'Sign in first.');
    const { raw, isForm } = await readInput(ctx);
    const body = parseOrThrow(Body, raw);
    await switchWorkspace(user.id, sessionId, body.workspaceId);
    if (isForm) {
      const back = ctx.request.headers.get('referer');
      let to = '/';
      try { if (back) { const u = new URL(back); if (u.host === ctx.url.host) to = u.pathname + u.search; } } catch { /* keep / */ }
      return ctx.redirect(to, 303);
    }
    return json({ ok: true, workspaceId: body.workspaceId });
  } catch (err) {
    return errorResponse(err);
  }
};
