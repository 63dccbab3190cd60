/** Data for the board's integration and e2e tests: a workspace with stills, fermenters and ferments, built in the database. */
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { createTestWorkspace, type TestWorkspace } from './api';

export interface BoardFixture extends TestWorkspace {
  stills: { ws1: number; ws2: number; small: number };
  washTypeId: number;
  fermenterIds: number[];
}

const allWeek = [0, 1, 2, 3, 4, 5, 6].map((weekday) => ({ weekday, open: '00:00', close: '24:00' }));
const typical = { stripping: 240, spirit: 420, redistillation: 360, cleaning: 120, maintenance: 240 };

/** Three stills open around the clock (so tests do not depend on today's weekday), Wash Still 1 needs 60 min cleaning after each run. */
export async function boardFixture(name = 'Board Test Distillery', timeZone = 'Europe/London'): Promise<BoardFixture> {
  const ws = await createTestWorkspace(name, { timeZone });
  const db = getDb();
  const mk = async (nameS: string, capacityLitres: number, cleaning: number, position: number) => {
    const [r] = await db
      .insert(t.stills)
      .values({
        workspaceId: ws.workspaceId,
        name: nameS,
        kind: 'pot',
        capacityLitres,
        heatingKw: 60,
        operatingHours: allWeek,
        cleaningAfterRunMinutes: cleaning,
        typicalMinutes: typical,
        position,
      })
      .$returningId();
    return r!.id;
  };
  const stills = { ws1: await mk('Wash Still 1', 2500, 60, 0), ws2: await mk('Wash Still 2', 2500, 0, 1), small: await mk('Small Still', 300, 0, 2) };
  const [wt] = await db
    .insert(t.washTypes)
    .values({ workspaceId: ws.workspaceId, name: 'All-grain wash', category: 'grain', terminalMin: 1.002, terminalMax: 1.008, typicalOg: 1.06 })
    .$returningId();
  const fermenterIds: number[] = [];
  for (const [i, fv] of ['FV1', 'FV2', 'FV3'].entries()) {
    const [r] = await db.insert(t.fermenters).values({ workspaceId: ws.workspaceId, name: fv, capacityLitres: 3000, position: i }).$returningId();
    fermenterIds.push(r!.id);
  }
  return { ...ws, stills, washTypeId: wt!.id, fermenterIds };
}

const DAY = 86_400_000;

/**
 * A grain ferment with twice-daily hydrometer readings. `holdAt` makes it stick there
 * (a stuck ferment: the same reading for days, far above the 1.002–1.008 finish range);
 * without it the gravity follows a first-order fall from OG to 1.005.
 */
export async function addFerment(
  fx: BoardFixture,
  opts: { code: string; fermenter: number; pitchedDaysAgo: number; og?: number; holdAt?: number; k?: number; volume?: number; readings?: boolean },
): Promise<number> {
  const db = getDb();
  const now = Date.now();
  const og = opts.og ?? 1.062;
  const pitchedAt = new Date(now - opts.pitchedDaysAgo * DAY);
  const [f] = await db
    .insert(t.ferments)
    .values({
      workspaceId: fx.workspaceId,
      code: opts.code,
      washTypeId: fx.washTypeId,
      fermenterId: fx.fermenterIds[opts.fermenter]!,
      volumeLitres: opts.volume ?? 2400,
      pitchedAt,
      og,
    })
    .$returningId();
  if (opts.readings !== false) {
    const rows = [];
    for (let tMs = pitchedAt.getTime() + 0.25 * DAY; tMs < now - 3_600_000; tMs += 0.5 * DAY) {
      const days = (tMs - pitchedAt.getTime()) / DAY;
      const fg = opts.holdAt ?? 1.005;
      let sg = fg + (og - fg) * Math.exp(-(opts.k ?? 0.9) * days);
      if (opts.holdAt !== undefined && days > 4) sg = opts.holdAt;
      sg = Math.round(sg * 1000) / 1000;
      rows.push({
        workspaceId: fx.workspaceId,
        fermentId: f!.id,
        takenAt: new Date(tMs),
        method: 'hydrometer' as const,
        rawValue: sg,
        rawUnit: 'sg' as const,
        correctedSg: sg,
        sampleTempC: 20,
        sampleTempUnit: 'C' as const,
      });
    }
    if (rows.length) await db.insert(t.readings).values(rows);
  }
  return f!.id;
}

/** Whole hours from now, on the hour (UTC), `days` ahead plus `hours`. */
export function at(days: number, hours = 0): Date {
  const base = new Date();
  base.setUTCMinutes(0, 0, 0);
  return new Date(base.getTime() + days * DAY + hours * 3_600_000);
}

export const iso = (d: Date) => d.toISOString();
