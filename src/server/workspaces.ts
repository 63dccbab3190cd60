import { and, eq, asc } from 'drizzle-orm';
import { getDb } from '../db/client';
import { memberships, workspaces } from '../db/schema';
import type { FermenterReleaseMoment, NumberFormat, Role, UnitSystem } from '../lib/vocabulary';

export interface WorkspaceSettings {
  id: number;
  name: string;
  timeZone: string;
  units: UnitSystem;
  calibrationTempC: number;
  stableDays: number;
  stableTolerance: number;
  wortCorrectionFactor: number;
  isDemo: boolean;
  /** How typed numbers are read: decimal point or decimal comma. */
  numberFormat: NumberFormat;
  /** At-risk threshold: a run is at risk when its wash is less likely than this (0–1) to be confirmable by its start. */
  atRiskThreshold: number;
  /** Starting a run more than this many minutes before its booking asks for confirmation. */
  startEarlyMarginMinutes: number;
  /** When a stripping run marks the washes it charged as emptied. */
  releaseFermentersOn: FermenterReleaseMoment;
  /** Runs and closures may be booked at most this many days ahead. */
  bookingHorizonDays: number;
  /** When the getting-started checklist was put away; null = shown until complete. */
  setupDismissedAt: Date | null;
}

export async function membershipsOf(userId: number): Promise<Array<{ workspaceId: number; name: string; role: Role }>> {
  const db = getDb();
  return db
    .select({ workspaceId: memberships.workspaceId, name: workspaces.name, role: memberships.role })
    .from(memberships)
    .innerJoin(workspaces, eq(workspaces.id, memberships.workspaceId))
    .where(eq(memberships.userId, userId))
    .orderBy(asc(workspaces.name));
}

export function toSettings(row: typeof workspaces.$inferSelect): WorkspaceSettings {
  return {
    id: row.id,
    name: row.name,
    timeZone: row.timeZone,
    units: row.units,
    calibrationTempC: row.calibrationTempC,
    stableDays: row.stableDays,
    stableTolerance: row.stableTolerance,
    wortCorrectionFactor: row.wortCorrectionFactor,
    isDemo: row.isDemo,
    numberFormat: row.numberFormat,
    atRiskThreshold: row.atRiskThreshold,
    startEarlyMarginMinutes: row.startEarlyMarginMinutes,
    releaseFermentersOn: row.releaseFermentersOn,
    bookingHorizonDays: row.bookingHorizonDays,
    setupDismissedAt: row.setupDismissedAt,
  };
}

export async function workspaceSettings(workspaceId: number): Promise<WorkspaceSettings | null> {
  const [row] = await getDb().select().from(workspaces).where(eq(workspaces.id, workspaceId)).limit(1);
  return row ? toSettings(row) : null;
}

export async function roleIn(userId: number, workspaceId: number): Promise<Role | null> {
  const [row] = await getDb()
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.userId, userId), eq(memberships.workspaceId, workspaceId)))
    .limit(1);
  return row?.role ?? null;
}

/** True when the person belongs to the demo distillery (whose sign-ins are published). */
export async function isDemoMember(userId: number): Promise<boolean> {
  const [row] = await getDb()
    .select({ id: workspaces.id })
    .from(memberships)
    .innerJoin(workspaces, eq(workspaces.id, memberships.workspaceId))
    .where(and(eq(memberships.userId, userId), eq(workspaces.isDemo, true)))
    .limit(1);
  return !!row;
}

/** How many demo distilleries this database holds (a production start warns when it is not 0). */
export async function countDemoWorkspaces(): Promise<number> {
  const rows = await getDb().select({ id: workspaces.id }).from(workspaces).where(eq(workspaces.isDemo, true));
  return rows.length;
}
