import { z } from 'zod';
import { route, invalid } from '../../../server/http';
import { getBoardBody, MAX_RANGE_DAYS } from '../../../server/board';

const query = z.object({
  from: z.iso.datetime({ offset: true }).transform((s) => new Date(s)),
  to: z.iso.datetime({ offset: true }).transform((s) => new Date(s)),
});

/**
 * The board for [from, to): stills, runs, ferments with forecasts, fermenters, people.
 * Sent gzip-compressed when the client accepts it, with a validator: the island's periodic
 * refresh revalidates (If-None-Match) and gets 304 while nothing changed. `private, no-cache`
 * keeps it out of shared caches and makes the browser ask every time.
 */
export const GET = route({ auth: 'board.read', query }, async ({ req, ctx, query }) => {
  const days = (query.to.getTime() - query.from.getTime()) / 86_400_000;
  if (!(days > 0)) throw invalid('to', 'The range must end after it starts.');
  if (days > MAX_RANGE_DAYS) throw invalid('to', `Ask for at most ${MAX_RANGE_DAYS} days at a time.`);
  // "Cache-Control: no-cache" (or max-age=0) from the client: it just changed something, maybe
  // through another instance, so the workspace's fingerprint is read again rather than trusted.
  const fresh = /no-cache|max-age=0/i.test(req.request.headers.get('cache-control') ?? '');
  const body = await getBoardBody(ctx, query.from, query.to, new Date(), { fresh });
  const headers: Record<string, string> = { 'cache-control': 'private, no-cache', etag: body.etag, vary: 'Accept-Encoding, Cookie' };
  const ifNoneMatch = req.request.headers.get('if-none-match');
  if (ifNoneMatch && ifNoneMatch.split(',').some((tag) => tag.trim() === body.etag)) return new Response(null, { status: 304, headers });
  headers['content-type'] = 'application/json; charset=utf-8';
  if (/\bgzip\b/i.test(req.request.headers.get('accept-encoding') ?? '')) {
    headers['content-encoding'] = 'gzip';
    return new Response(body.gzip, { status: 200, headers });
  }
  return new Response(body.json, { status: 200, headers });
});
