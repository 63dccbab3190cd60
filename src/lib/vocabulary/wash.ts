/** Washes: the category of a wash type, and why a fermenter was emptied. */

export const WASH_CATEGORIES = ['sugar', 'grain', 'molasses', 'fruit', 'other'] as const;
export type WashCategory = (typeof WASH_CATEGORIES)[number];

export const EMPTIED_REASONS = ['distilled', 'dumped'] as const;
export type EmptiedReason = (typeof EMPTIED_REASONS)[number];

/** When a stripping run frees the fermenters it charged: as it finishes, or as it starts. */
export const FERMENTER_RELEASE_MOMENTS = ['finish', 'start'] as const;
export type FermenterReleaseMoment = (typeof FERMENTER_RELEASE_MOMENTS)[number];

export const FERMENTER_RELEASE_LABELS: Record<FermenterReleaseMoment, string> = {
  finish: 'When the stripping run finishes',
  start: 'When the stripping run starts',
};
