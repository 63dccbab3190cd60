/** Washes: the category of a wash type, and why a fermenter was emptied. */

export const WASH_CATEGORIES = ['sugar', 'grain', 'molasses', 'fruit', 'other'] as const;
export type WashCategory = (typeof WASH_CATEGORIES)[number];

export const EMPTIED_REASONS = ['distilled', 'dumped'] as const;
export type EmptiedReason = (typeof EMPTIED_REASONS)[number];
