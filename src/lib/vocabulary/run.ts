/** Runs on a still: what kind of run, where it stands, and the fractions it gives. */

export const RUN_TYPES = ['stripping', 'spirit', 'redistillation', 'cleaning', 'maintenance'] as const;
export type RunType = (typeof RUN_TYPES)[number];

export const RUN_TYPE_LABELS: Record<RunType, string> = {
  stripping: 'Stripping run',
  spirit: 'Spirit run',
  redistillation: 'Redistillation run',
  cleaning: 'Cleaning',
  maintenance: 'Maintenance',
};

/** The same names cut down for a narrow block on the board (not a second wording). */
export const RUN_TYPE_ABBREVIATIONS: Record<RunType, string> = {
  stripping: 'Strip',
  spirit: 'Spirit',
  redistillation: 'Redist.',
  cleaning: 'Clean',
  maintenance: 'Maint.',
};

export const RUN_STATUSES = ['planned', 'confirmed', 'running', 'done', 'cancelled'] as const;
export type RunStatus = (typeof RUN_STATUSES)[number];

export const RUN_STATUS_LABELS: Record<RunStatus, string> = {
  planned: 'Planned',
  confirmed: 'Confirmed',
  running: 'Running',
  done: 'Done',
  cancelled: 'Cancelled',
};

/** Statuses a run may be booked or edited into; the others follow from operating it. */
export const BOOKABLE_RUN_STATUSES = ['planned', 'confirmed'] as const satisfies readonly RunStatus[];

export const OUTCOME_FRACTIONS = ['low_wines', 'heads', 'hearts', 'tails', 'feints'] as const;
export type Fraction = (typeof OUTCOME_FRACTIONS)[number];

export const FRACTION_LABELS: Record<Fraction, string> = {
  low_wines: 'Low wines',
  heads: 'Heads',
  hearts: 'Hearts',
  tails: 'Tails',
  feints: 'Feints',
};
