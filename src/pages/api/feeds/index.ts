import { route, json } from '../../../server/http';
import { createFeed, createFeedSchema, feedGroupJson, feedJson, groupFeedsByHolder, listFeeds } from '../../../server/feeds';

/**
 * Feeds this person may see (a manager sees every feed of the distillery), flat and grouped by
 * the person who holds each one. Tokens are never listed.
 */
export const GET = route({ auth: 'feeds.own' }, async ({ ctx }) => {
  const feeds = await listFeeds(ctx);
  return json({ feeds: feeds.map(feedJson), groups: groupFeedsByHolder(feeds).map(feedGroupJson) });
});

/** Create a feed; the answer carries the token this once. */
export const POST = route({ auth: 'feeds.own', body: createFeedSchema }, async ({ ctx, body }) => {
  const created = await createFeed(ctx, body);
  return json({ feed: feedJson(created.feed), token: created.token, url: created.url, webcal: created.webcal }, 201);
});
