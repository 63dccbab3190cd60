/** Shapes the board API sends and the board island reads. Times travel as ISO strings. */
import type { Closure, FermentStatus, OperatingHours, Run, RunStatus, RunType } from '../schedule';

import type { StillKind } from '../vocabulary';

export type { StillKind };

export interface BoardStill {
  id: number;
  name: string;
  kind: StillKind;
  capacityLitres: number;
  heatingKw: number;
  operatingHours: OperatingHours[];
  closures: Closure[];
  cleaningAfterRunMinutes: number;
  typicalMinutes: Record<RunType, number>;
  position: number;
}

export interface BoardRunJson {
  id: number;
  stillId: number;
  type: RunType;
  status: RunStatus;
  startsAt: string;
  endsAt: string;
  operatorId: number | null;
  chargeLitres: number | null;
  chargeAbv: number | null;
  ferments: Array<{ fermentId: number; litres: number }>;
  feeds: Array<{ runId: number; litres: number }>;
  lowWinesLitres: number | null;
  version: number;
  sequence: number;
  notes: string | null;
  /** When the run was actually started and finished (null until then); startsAt/endsAt stay the booking. */
  startedAt: string | null;
  finishedAt: string | null;
  /** Whether the run was at risk when last booked or moved (absent on runs not yet saved). */
  bookedAtRisk?: boolean;
}

export interface BoardFermentJson {
  id: number;
  code: string;
  volumeLitres: number;
  fermenterId: number | null;
  washCategory: string;
  pitchedAt: string | null;
  emptiedAt: string | null;
  status: FermentStatus;
  reason: string;
  readyAt: string | null;
  readyP10: string | null;
  readyP90: string | null;
  confirmedAt: string | null;
  lastSg: number | null;
  predictedFg: number | null;
}

export interface BoardPayload {
  range: { from: string; to: string };
  timeZone: string;
  now: string;
  stableDays: number;
  /** A run is at risk when its wash is less likely than this (0–1) to be confirmable by its start. */
  atRiskThreshold: number;
  stills: BoardStill[];
  runs: BoardRunJson[];
  ferments: BoardFermentJson[];
  fermenters: Array<{ id: number; name: string; capacityLitres: number }>;
  people: Array<{ id: number; name: string; role: string }>;
}

/** A run with real Dates, as the pure rules want it (plus what the board shows). */
export interface BoardRun extends Run {
  chargeAbv: number | null;
  lowWinesLitres: number | null;
  version: number;
  sequence: number;
  notes: string | null;
  /** When the run was actually started and finished (null until then); startsAt/endsAt stay the booking. */
  startedAt?: Date | null;
  finishedAt?: Date | null;
}

export interface BoardFerment {
  id: number;
  code: string;
  volumeLitres: number;
  fermenterId: number | null;
  washCategory: string;
  pitchedAt: Date | null;
  emptiedAt: Date | null;
  status: FermentStatus;
  reason: string;
  readyAt: Date | null;
  readyP10: Date | null;
  readyP90: Date | null;
  confirmedAt: Date | null;
  lastSg: number | null;
  predictedFg: number | null;
}

export interface Board {
  range: { from: Date; to: Date };
  timeZone: string;
  now: Date;
  stableDays: number;
  atRiskThreshold: number;
  stills: BoardStill[];
  runs: BoardRun[];
  ferments: BoardFerment[];
  fermenters: BoardPayload['fermenters'];
  people: BoardPayload['people'];
}
