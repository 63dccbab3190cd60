/** Planning rules of the board that sit on top of the schedule rules: readiness, risk, vessels, defaults. */
import { computeRunWarnings, DEFAULT_AT_RISK_THRESHOLD, estimateDurationMinutes, fermentRisks, isAtRisk, needsCleaningAfter } from '../schedule';
import type { FermentState, Run, RunType, Still, Warning } from '../schedule';
import type { Board, BoardFerment, BoardFermentJson, BoardPayload, BoardRun, BoardRunJson, BoardStill } from './types';

const DAY_MS = 86_400_000;
const d = (iso: string | null): Date | null => (iso === null ? null : new Date(iso));

export function hydrateRun(r: BoardRunJson): BoardRun {
  return { ...r, startsAt: new Date(r.startsAt), endsAt: new Date(r.endsAt), startedAt: d(r.startedAt ?? null), finishedAt: d(r.finishedAt ?? null) };
}

export function dehydrateRun(r: BoardRun): BoardRunJson {
  return {
    ...r,
    startsAt: r.startsAt.toISOString(),
    endsAt: r.endsAt.toISOString(),
    startedAt: r.startedAt?.toISOString() ?? null,
    finishedAt: r.finishedAt?.toISOString() ?? null,
  };
}

export function hydrateFerment(f: BoardFermentJson): BoardFerment {
  return {
    ...f,
    pitchedAt: d(f.pitchedAt),
    emptiedAt: d(f.emptiedAt),
    readyAt: d(f.readyAt),
    readyP10: d(f.readyP10),
    readyP90: d(f.readyP90),
    confirmedAt: d(f.confirmedAt),
  };
}

export function hydrateBoard(p: BoardPayload, clientNow?: Date): Board {
  return {
    range: { from: new Date(p.range.from), to: new Date(p.range.to) },
    timeZone: p.timeZone,
    // A cached payload's "now" is when it was built; the island passes its own clock.
    now: clientNow && clientNow.getTime() > Date.parse(p.now) ? clientNow : new Date(p.now),
    stableDays: p.stableDays,
    atRiskThreshold: p.atRiskThreshold ?? DEFAULT_AT_RISK_THRESHOLD,
    stills: p.stills,
    runs: p.runs.map(hydrateRun),
    ferments: p.ferments.map(hydrateFerment),
    fermenters: p.fermenters,
    people: p.people,
  };
}

/** The schedule rules' view of a run. */
export function toScheduleRun(r: BoardRun): Run {
  return {
    id: r.id,
    stillId: r.stillId,
    type: r.type,
    status: r.status,
    startsAt: r.startsAt,
    endsAt: r.endsAt,
    operatorId: r.operatorId,
    chargeLitres: r.chargeLitres,
    ferments: r.ferments,
    feeds: r.feeds,
    lowWinesLitres: r.lowWinesLitres,
    bookedAtRisk: r.bookedAtRisk,
  };
}

export function toFermentState(f: BoardFerment): FermentState {
  return {
    id: f.id,
    code: f.code,
    volumeLitres: f.volumeLitres,
    pitchedAt: f.pitchedAt,
    emptiedAt: f.emptiedAt,
    status: f.status,
    readyAt: f.readyAt,
    readyP10: f.readyP10,
    readyP90: f.readyP90,
    confirmedAt: f.confirmedAt,
  };
}

export function toScheduleStill(s: BoardStill): Still {
  return {
    id: s.id,
    name: s.name,
    capacityLitres: s.capacityLitres,
    heatingKw: s.heatingKw,
    operatingHours: s.operatingHours,
    closures: s.closures,
    cleaningAfterRunMinutes: s.cleaningAfterRunMinutes,
    typicalMinutes: s.typicalMinutes,
  };
}

/** Warnings for every live run on the board, by run id (one pass of the shared rules). */
export function boardWarnings(
  board: Pick<Board, 'stills' | 'runs' | 'ferments' | 'timeZone' | 'now'> & Partial<Pick<Board, 'atRiskThreshold'>>,
): Map<number, Warning[]> {
  const stills = new Map(board.stills.map((s) => [s.id, toScheduleStill(s)]));
  const ferments = new Map(board.ferments.map((f) => [f.id, toFermentState(f)]));
  const runs = board.runs.map(toScheduleRun);
  const out = new Map<number, Warning[]>();
  for (const run of runs) {
    const still = stills.get(run.stillId);
    if (!still || run.status === 'cancelled') continue;
    out.set(run.id, computeRunWarnings(run, { still, runs, ferments, timeZone: board.timeZone, now: board.now, atRiskThreshold: board.atRiskThreshold }));
  }
  return out;
}

export type WindowPlacement = 'before' | 'inside' | 'after' | 'unknown';

/**
 * Where a run's start sits against a ferment's ready window [P10, P90]
 * (or the single predicted time when the forecast gives no window).
 * A finished ferment counts as ready from when it was confirmed.
 */
export function windowPlacement(startsAt: Date, f: Pick<BoardFerment, 'status' | 'readyAt' | 'readyP10' | 'readyP90' | 'confirmedAt'>): WindowPlacement {
  const t = startsAt.getTime();
  if (f.status === 'finished' && f.confirmedAt) return t < f.confirmedAt.getTime() ? 'before' : 'after';
  const early = f.readyP10 ?? f.readyAt;
  const late = f.readyP90 ?? f.readyAt;
  if (!early || !late) return 'unknown';
  if (t < early.getTime()) return 'before';
  if (t < late.getTime()) return 'inside';
  return 'after';
}

/** Litres of each ferment already booked into live runs. */
export function bookedLitres(runs: readonly Pick<BoardRun, 'status' | 'ferments'>[]): Map<number, number> {
  const out = new Map<number, number>();
  for (const r of runs) {
    if (r.status === 'cancelled') continue;
    for (const c of r.ferments) out.set(c.fermentId, (out.get(c.fermentId) ?? 0) + c.litres);
  }
  return out;
}

export interface BookableFerment {
  ferment: BoardFerment;
  unbookedLitres: number;
}

const STATUS_RANK: Record<string, number> = { finished: 0, slowing: 1, active: 1, lag: 1, insufficient_data: 2, stalled: 3, souring: 3 };

/**
 * Ferments still in their fermenters with wash not yet booked, for the side
 * list: confirmed-finished first, then by predicted ready time (soonest
 * first, unknown last), stalled and souring washes last.
 */
export function bookableFerments(ferments: readonly BoardFerment[], runs: readonly BoardRun[]): BookableFerment[] {
  const booked = bookedLitres(runs);
  return ferments
    .filter((f) => f.emptiedAt === null && f.pitchedAt !== null)
    .map((f) => ({ ferment: f, unbookedLitres: Math.max(0, f.volumeLitres - (booked.get(f.id) ?? 0)) }))
    .filter((b) => b.unbookedLitres > 0.5)
    .sort((a, b) => {
      const ra = STATUS_RANK[a.ferment.status] ?? 2;
      const rb = STATUS_RANK[b.ferment.status] ?? 2;
      if (ra !== rb) return ra - rb;
      const ta = (a.ferment.confirmedAt ?? a.ferment.readyAt)?.getTime() ?? Infinity;
      const tb = (b.ferment.confirmedAt ?? b.ferment.readyAt)?.getTime() ?? Infinity;
      if (ta !== tb) return ta - tb;
      return a.ferment.code.localeCompare(b.ferment.code);
    });
}

export interface RunAtRisk {
  run: BoardRun;
  /**
   * Per wash at risk: stalled or souring; early (starts before P10) or at_risk (before the
   * threshold quantile) for a run booked that way; late when the run was not at risk when
   * booked and the ready window has since moved past it.
   */
  reasons: Array<{ fermentId: number; code: string; why: 'stalled' | 'souring' | 'early' | 'at_risk' | 'late' }>;
}

/**
 * Runs not yet over whose wash may not be there, by the one at-risk test (`fermentRisk`:
 * the run starts before the `threshold` quantile of a linked wash's ready time, or the
 * wash is stalled or souring). Soonest runs first.
 */
export function runsAtRisk(
  runs: readonly BoardRun[],
  ferments: readonly BoardFerment[],
  now: Date,
  threshold: number = DEFAULT_AT_RISK_THRESHOLD,
): RunAtRisk[] {
  const byId = new Map(ferments.map((f) => [f.id, f]));
  const out: RunAtRisk[] = [];
  for (const run of runs) {
    if (run.status !== 'planned' && run.status !== 'confirmed') continue;
    if (run.endsAt.getTime() <= now.getTime()) continue;
    const reasons: RunAtRisk['reasons'] = [];
    for (const { fermentId, risk } of fermentRisks(run, byId, threshold)) {
      if (!isAtRisk(risk)) continue;
      const code = byId.get(fermentId)!.code;
      if (risk === 'stalled' || risk === 'souring') reasons.push({ fermentId, code, why: risk });
      else reasons.push({ fermentId, code, why: run.bookedAtRisk === false ? 'late' : risk === 'early' ? 'early' : 'at_risk' });
    }
    if (reasons.length) out.push({ run, reasons });
  }
  return out.sort((a, b) => a.run.startsAt.getTime() - b.run.startsAt.getTime());
}

/**
 * The earliest a run at risk should be moved to: after the late edge (P90)
 * of every linked ferment's ready window. A stalled or souring wash has no
 * honest window, so it gets a fresh stability period (`stableDays`) from now
 * before it can be confirmed finished.
 */
export function notBeforeForRisk(run: Pick<BoardRun, 'ferments'>, ferments: readonly BoardFerment[], now: Date, stableDays: number): Date {
  const byId = new Map(ferments.map((f) => [f.id, f]));
  let t = now.getTime();
  for (const c of run.ferments) {
    const f = byId.get(c.fermentId);
    if (!f || f.status === 'finished') continue;
    if (f.status === 'stalled' || f.status === 'souring') {
      t = Math.max(t, now.getTime() + stableDays * DAY_MS);
      continue;
    }
    const late = f.readyP90 ?? f.readyAt;
    if (late) t = Math.max(t, late.getTime());
  }
  return new Date(t);
}

export interface VesselBar {
  fermentId: number;
  code: string;
  status: BoardFerment['status'];
  pitchedAt: Date;
  readyP10: Date | null;
  readyP90: Date | null;
  /** When the fermenter frees up: when it was emptied, else the earliest run still to take this wash; null = open-ended. */
  freeAt: Date | null;
  freedBy: 'run' | 'emptied' | null;
}

/**
 * Per fermenter, each ferment from pitching through its ready window to the run that empties it.
 * An emptied ferment's bar ends at its emptying (a stripping run frees it when its charges take
 * the wash, or someone marked it). A ferment not emptied although a run that took part of it is
 * done still holds wash: its bar runs on to the next run booked on it, or stays open.
 */
export function vesselBars(fermenters: readonly { id: number }[], ferments: readonly BoardFerment[], runs: readonly BoardRun[]): Map<number, VesselBar[]> {
  const firstRun = new Map<number, Date>();
  for (const r of runs) {
    if (r.status === 'cancelled' || r.status === 'done') continue;
    for (const c of r.ferments) {
      const prev = firstRun.get(c.fermentId);
      if (!prev || r.startsAt < prev) firstRun.set(c.fermentId, r.startsAt);
    }
  }
  const out = new Map<number, VesselBar[]>(fermenters.map((v) => [v.id, []]));
  for (const f of ferments) {
    if (f.fermenterId === null || !f.pitchedAt) continue;
    const list = out.get(f.fermenterId);
    if (!list) continue;
    const run = firstRun.get(f.id) ?? null;
    const freeAt = f.emptiedAt ?? run;
    list.push({
      fermentId: f.id,
      code: f.code,
      status: f.status,
      pitchedAt: f.pitchedAt,
      readyP10: f.readyP10,
      readyP90: f.readyP90,
      freeAt,
      freedBy: f.emptiedAt ? 'emptied' : run ? 'run' : null,
    });
  }
  for (const list of out.values()) list.sort((a, b) => a.pitchedAt.getTime() - b.pitchedAt.getTime());
  return out;
}

/** Typical strength of a charge when none is given: a wash ~8 % vol, low wines for a spirit run ~28 % vol (common practice). */
export const DEFAULT_CHARGE_ABV: Record<RunType, number> = { stripping: 8, spirit: 28, redistillation: 40, cleaning: 0, maintenance: 0 };

/**
 * A run's default length: heat-up of the charge on this still's heating
 * power plus the still's typical minutes for the run type. Cleaning and
 * maintenance take the typical minutes alone.
 */
export function defaultRunMinutes(
  still: Pick<BoardStill, 'heatingKw' | 'typicalMinutes'>,
  type: RunType,
  chargeLitres: number | null,
  chargeAbv: number | null = null,
): number {
  const typical = still.typicalMinutes[type] ?? 0;
  if (!needsCleaningAfter(type) || !chargeLitres || chargeLitres <= 0 || !(still.heatingKw > 0)) return Math.max(typical, 30);
  return estimateDurationMinutes({ chargeLitres, abvPercent: chargeAbv ?? DEFAULT_CHARGE_ABV[type], heatingKw: still.heatingKw, typicalMinutes: typical })
    .totalMinutes;
}
