export { buildFeed, DEFAULT_PRODID } from './feed';
export type { EventStatus, FeedEvent, FeedInput } from './feed';
export { describeRunEvent, runEventStatus, runEventTitle, uidForRun } from './run-event';
export type { RunEventDescriptionInput, RunEventStatusInput } from './run-event';
export { escapeText, foldLine, formatDurationMinutes, octetLength, unfold } from './text';
