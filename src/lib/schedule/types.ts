/** Shapes shared by the board's pure rules (server API and board island alike). */

import type { ForecastStatus, RunStatus, RunType } from '../vocabulary';

export type { RunStatus, RunType };
export type Weekday = 0 | 1 | 2 | 3 | 4 | 5 | 6;

/** One opening interval on a weekday, wall-clock in the distillery's time zone. */
export interface OperatingHours {
  /** 0 = Sunday … 6 = Saturday. */
  weekday: Weekday;
  /** 'HH:MM'. */
  open: string;
  /** 'HH:MM'; '24:00' means the end of that day; at or before `open` means the next day (an overnight shift). */
  close: string;
}

export interface Closure {
  /** First closed date, 'YYYY-MM-DD' in the distillery's time zone. */
  startsOn: string;
  /** Last closed date (inclusive). */
  endsOn: string;
  reason: string;
}

export interface Still {
  id: number;
  name: string;
  capacityLitres: number;
  heatingKw: number;
  operatingHours: OperatingHours[];
  closures: Closure[];
  /** Cleaning slot the still needs after each distillation run; 0 = none. */
  cleaningAfterRunMinutes: number;
  typicalMinutes: Record<RunType, number>;
}

export interface RunFermentCharge {
  fermentId: number;
  litres: number;
}

export interface RunFeed {
  /** The stripping run whose low wines go into this spirit run. */
  runId: number;
  litres: number;
}

export interface Run {
  id: number;
  stillId: number;
  type: RunType;
  status: RunStatus;
  startsAt: Date;
  endsAt: Date;
  operatorId: number | null;
  chargeLitres: number | null;
  ferments: RunFermentCharge[];
  /** For spirit runs: the stripping runs feeding it, with litres of low wines taken from each. */
  feeds: RunFeed[];
  /** For stripping runs: expected or recorded low wines output. */
  lowWinesLitres?: number | null;
  /** Whether the run was at risk when last booked or moved; false with a run at risk now = its wash is late. */
  bookedAtRisk?: boolean;
}

/** A ferment's state on the board is its forecast's status. */
export type FermentStatus = ForecastStatus;

export interface FermentState {
  id: number;
  code: string;
  volumeLitres: number;
  pitchedAt: Date | null;
  emptiedAt: Date | null;
  status: FermentStatus;
  /** Predicted finish (median of the forecast). */
  readyAt: Date | null;
  readyP10: Date | null;
  readyP90: Date | null;
  /** When the stability rule was met. */
  confirmedAt: Date | null;
}

export type WarningCode =
  | 'booked_before_ready'
  | 'booked_before_stable'
  | 'ferment_stalled'
  | 'ferment_souring'
  | 'over_capacity'
  | 'ferment_overallocated'
  | 'outside_hours'
  | 'on_closure'
  | 'operator_double_booked'
  | 'ferment_not_pitched'
  | 'ferment_emptied'
  | 'spirit_before_feed'
  | 'spirit_over_feed';

export type WarningSeverity = 'danger' | 'warning' | 'info';

export interface Warning {
  code: WarningCode;
  severity: WarningSeverity;
  message: string;
  fermentId?: number;
  runId?: number;
}

/** A half-open time interval [start, end). */
export interface TimeRange {
  start: Date;
  end: Date;
}
