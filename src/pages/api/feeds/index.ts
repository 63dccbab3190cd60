import { route, json } from '../../../server/http';
import { createFeed, createFeedSchema, feedGroupJson, feedJson, groupFeedsByHolder, listFeeds } from '../../../server/feeds';

/**
 * Feeds this person may see (a manager sees every feed of the distillery), flat and grouped by
 * the person who holds each one. Tokens are never listed.
 */
export const GET = route({ action: 'feeds.own' }, async ({ auth }) => {
  const feeds = await listFeeds(auth);
  return json({ feeds: feeds.map(feedJson), groups: groupFeedsByHolder(feeds).map(feedGroupJson) });
});

/** Create a feed; the answer carries the token this once. */
export const POST = route({ action: 'feeds.own', body: createFeedSchema }, async ({ auth, body }) => {
  const created = await createFeed(auth, body);
  return json({ feed: feedJson(created.feed), token: created.token, url: created.url, webcal: created.webcal }, 201);
});
