import { route, idParam } from '../../../server/http';
import { revokeFeed } from '../../../server/feeds';

/** Revoke a feed: its creator, or a manager. */
export const DELETE = route({ action: 'feeds.own' }, async ({ auth, params }) => {
  await revokeFeed(auth, idParam(params.id));
  return new Response(null, { status: 204, headers: { 'cache-control': 'no-store' } });
});
