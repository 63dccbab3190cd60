import type { Warning, WarningCode } from '../../lib/schedule';
import { FORECAST_STATUS_LABELS } from '../../lib/vocabulary';

/** Short badge words for each warning; the full sentence is in the title and the run's details. */
export const WARNING_BADGES: Record<WarningCode, string> = {
  booked_before_ready: 'Not ready',
  booked_before_stable: 'Not stable',
  ferment_stalled: FORECAST_STATUS_LABELS.stalled,
  ferment_souring: FORECAST_STATUS_LABELS.souring,
  over_capacity: 'Over capacity',
  ferment_overallocated: 'Wash overbooked',
  outside_hours: 'Out of hours',
  on_closure: 'Closed',
  operator_double_booked: 'Operator twice',
  ferment_not_pitched: 'Not pitched',
  ferment_emptied: 'Emptied',
  spirit_before_feed: 'Before feed',
  spirit_over_feed: 'Over feed',
};

export function WarningBadges({ warnings, compact = false }: { warnings: readonly Warning[]; compact?: boolean }) {
  const shown = warnings.filter((w) => w.severity !== 'info');
  if (shown.length === 0) return null;
  if (compact) {
    const danger = shown.some((w) => w.severity === 'danger');
    return <span className={`wb-dot ${danger ? 'wb-danger' : 'wb-warning'}`} title={shown.map((w) => w.message).join('\n')} aria-hidden="true" />;
  }
  const seen = new Set<string>();
  return (
    <span className="wb-row">
      {shown
        .filter((w) => (seen.has(w.code) ? false : (seen.add(w.code), true)))
        .map((w) => (
          <span key={w.code} className={`wb wb-${w.severity}`} data-warning={w.code} title={w.message}>
            {WARNING_BADGES[w.code]}
          </span>
        ))}
    </span>
  );
}
