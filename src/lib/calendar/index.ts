export { buildFeed, buildFeedAsync, DEFAULT_PRODID, EventCache, eventKey, feedEventKeys, formatUtcDateTime, sharedEventCache } from './feed';
export type { EventStatus, FeedEvent, FeedInput } from './feed';
export { describeRunEvent, runEventStatus, runEventTitle, uidForRun } from './run-event';
export type { RunEventDescriptionInput, RunEventStatusInput } from './run-event';
export { escapeText, foldLine, formatDurationMinutes, normaliseText, unfold } from './text';
