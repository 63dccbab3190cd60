import type { Role } from '../lib/vocabulary';

/**
 * The one place that decides role × action. Every API route and page asks `can()`.
 * See docs/RELIABILITY.md for the table in prose.
 */
export const ACTIONS = {
  'board.read': ['manager', 'planner', 'distiller', 'staff'],
  'ferments.read': ['manager', 'planner', 'distiller', 'staff'],
  'ferments.write': ['manager', 'planner'],
  /** Starting a ferment and marking a fermenter emptied are floor work too (PRODUCT.md: distillers start ferments and mark them emptied). */
  'ferments.start': ['manager', 'planner', 'distiller'],
  'ferments.empty': ['manager', 'planner', 'distiller'],
  'readings.write': ['manager', 'planner', 'distiller'],
  'runs.book': ['manager', 'planner'],
  'runs.move': ['manager', 'planner', 'distiller'],
  'runs.operate': ['manager', 'planner', 'distiller'],
  /** Correcting when a run really started or finished, afterwards, with a reason (audited). */
  'runs.correct_times': ['manager', 'planner'],
  'feeds.own': ['manager', 'planner', 'distiller', 'staff'],
  'feeds.manage': ['manager'],
  'reports.read': ['manager', 'planner'],
  'exports.full': ['manager'],
  'vessels.manage': ['manager'],
  'washtypes.manage': ['manager'],
  'settings.manage': ['manager'],
  'members.manage': ['manager'],
  'audit.read': ['manager'],
  'mailbox.read': ['manager'],
  'setup.read': ['manager', 'planner'],
} as const satisfies Record<string, readonly Role[]>;

export type Action = keyof typeof ACTIONS;

export function can(role: Role | null | undefined, action: Action): boolean {
  if (!role) return false;
  return (ACTIONS[action] as readonly Role[]).includes(role);
}
