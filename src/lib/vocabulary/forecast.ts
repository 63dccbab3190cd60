/** Where a ferment stands, as its forecast reads the gravity readings. */

/** In the order a healthy ferment passes through them; the last two are trouble. */
export const FORECAST_STATUSES = ['insufficient_data', 'lag', 'active', 'slowing', 'finished', 'stalled', 'souring'] as const;
export type ForecastStatus = (typeof FORECAST_STATUSES)[number];

/** One wording per state, everywhere: board, ferment pages, run page, calendar feed. */
export const FORECAST_STATUS_LABELS: Record<ForecastStatus, string> = {
  insufficient_data: 'Not enough readings',
  lag: 'Not falling yet',
  active: 'Fermenting',
  slowing: 'Slowing',
  finished: 'Finished',
  stalled: 'Stalled',
  souring: 'Possible souring',
};
