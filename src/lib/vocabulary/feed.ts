/** What a calendar feed covers: the whole distillery, one still, or the runs one person operates. */
export const FEED_SCOPES = ['workspace', 'still', 'person'] as const;
export type FeedScope = (typeof FEED_SCOPES)[number];

export const FEED_SCOPE_LABELS: Record<FeedScope, string> = {
  workspace: 'Whole distillery',
  still: 'One still',
  person: 'One person’s runs',
};
