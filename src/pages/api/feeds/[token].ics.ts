/**
 * GET /api/feeds/<token>.ics: a calendar subscription. Public by design (middleware lets
 * it through): the token is the capability. The URL is never logged here, and an unknown
 * or revoked token gets the same bare 404 as any missing page.
 */
import { route, jsonError } from '../../../server/http';
import { feedForToken, notModified, renderFeedCached, stampFetched } from '../../../server/feeds';

const FEED_HEADERS = {
  'cache-control': 'private, max-age=300',
  'referrer-policy': 'no-referrer',
  'x-content-type-options': 'nosniff',
};

const notFound = () => jsonError(404, 'not_found', 'Not found', undefined, { 'referrer-policy': 'no-referrer' });

export const GET = route({ auth: 'public' }, async ({ req, params }) => {
  const feed = await feedForToken(params.token ?? '');
  if (!feed) return notFound();
  const now = new Date();
  const rendered = await renderFeedCached(feed, now);
  await stampFetched(feed, now).catch(() => {});
  const headers = {
    ...FEED_HEADERS,
    etag: rendered.etag,
    'last-modified': rendered.lastModified.toUTCString(),
  };
  if (notModified(req.request.headers, rendered.etag, rendered.lastModified)) return new Response(null, { status: 304, headers });
  return new Response(rendered.body, {
    status: 200,
    headers: { ...headers, 'content-type': 'text/calendar; charset=utf-8', 'content-disposition': 'inline; filename="plateau.ics"' },
  });
});
