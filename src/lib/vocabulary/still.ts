/** Kinds of still. */

export const STILL_KINDS = ['pot', 'column', 'reflux'] as const;
export type StillKind = (typeof STILL_KINDS)[number];

export const STILL_KIND_LABELS: Record<StillKind, string> = { pot: 'Pot', column: 'Column', reflux: 'Reflux' };
