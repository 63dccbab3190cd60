import { route, idParam } from '../../../server/http';
import { revokeFeed } from '../../../server/feeds';

/** Revoke a feed: its creator, or a manager. */
export const DELETE = route({ auth: 'feeds.own' }, async ({ ctx, params }) => {
  await revokeFeed(ctx, idParam(params.id));
  return new Response(null, { status: 204, headers: { 'cache-control': 'no-store' } });
});
