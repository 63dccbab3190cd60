/**
 * Loads the demo distillery when it is not there yet (idempotent). `--force` removes an
 * existing demo workspace first. Prints the demo sign-ins.
 */
import { eq, and, inArray } from 'drizzle-orm';
import { writeFileSync, mkdirSync } from 'node:fs';
import { getDb, closeDb, type Db } from '../src/db/client';
import * as t from '../src/db/schema';
import { hashPassword } from '../src/server/auth/password';
import { newToken, hashToken } from '../src/server/auth/tokens';
import { correctReading } from '../src/lib/gravity';
import { getForecasts, replayForecastHistory } from '../src/server/forecasts';
import { recordRiskAtBooking } from '../src/server/run-risk';
import { systemCtx } from '../src/server/context';
import { workspaceSettings } from '../src/server/workspaces';
import { alcoholmeterCorrection, laa } from '../src/lib/alcohol';
import { DEMO_FERMENTERS, DEMO_PASSWORD, DEMO_PEOPLE, DEMO_STILLS, DEMO_TZ, DEMO_WASH_TYPES, DEMO_WORKSPACE, demoFerments, demoRuns } from './demo';

/** The demo feed's plain token, kept (mode 600) per database so `npm start` can print its URL. */
export const demoFeedTokenFile = (dbName = process.env.DB_NAME ?? 'plateau') => `.data/demo-feed-token-${dbName.replace(/[^A-Za-z0-9_-]/g, '_')}`;

export async function loadDemo(
  opts: { force?: boolean; now?: Date; quiet?: boolean; db?: Db; tokenFile?: string | null } = {},
): Promise<{ created: boolean; workspaceId: number; feedToken: string | null }> {
  const db = opts.db ?? getDb();
  const now = opts.now ?? new Date();
  const existing = await db
    .select()
    .from(t.workspaces)
    .where(and(eq(t.workspaces.name, DEMO_WORKSPACE), eq(t.workspaces.isDemo, true)));
  if (existing.length && !opts.force) return { created: false, workspaceId: existing[0]!.id, feedToken: null };
  if (existing.length) {
    await db.delete(t.workspaces).where(
      inArray(
        t.workspaces.id,
        existing.map((w) => w.id),
      ),
    );
    await db.delete(t.users).where(
      inArray(
        t.users.email,
        DEMO_PEOPLE.map((p) => p.email),
      ),
    );
  }
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const feedToken = newToken();

  const workspaceId = await db.transaction(async (tx) => {
    const [ws] = await tx.insert(t.workspaces).values({ name: DEMO_WORKSPACE, timeZone: DEMO_TZ, units: 'metric', isDemo: true }).$returningId();
    const wsId = ws!.id;
    const userIds = new Map<string, number>();
    for (const p of DEMO_PEOPLE) {
      const [u] = await tx.insert(t.users).values({ email: p.email, name: p.name, passwordHash, emailVerifiedAt: now }).$returningId();
      userIds.set(p.email, u!.id);
      await tx.insert(t.memberships).values({ workspaceId: wsId, userId: u!.id, role: p.role });
    }
    const byIndex = [...userIds.values()];
    const stillIds = new Map<string, number>();
    for (const [i, s] of DEMO_STILLS.entries()) {
      const [row] = await tx
        .insert(t.stills)
        .values({
          workspaceId: wsId,
          name: s.name,
          kind: s.kind,
          capacityLitres: s.capacityLitres,
          heatingKw: s.heatingKw,
          operatingHours: [...s.hours],
          cleaningAfterRunMinutes: s.cleaning,
          typicalMinutes: { ...s.typical },
          position: i,
        })
        .$returningId();
      stillIds.set(s.name, row!.id);
    }
    const christmas = (y: number) => `${y}-12-25`;
    const year = now.getUTCFullYear();
    await tx.insert(t.stillClosures).values([
      { workspaceId: wsId, stillId: null, startsOn: christmas(year), endsOn: `${year}-12-26`, reason: 'Christmas closure' },
      {
        workspaceId: wsId,
        stillId: stillIds.get('Column')!,
        startsOn: dateOnly(addDaysUtc(now, 15)),
        endsOn: dateOnly(addDaysUtc(now, 16)),
        reason: 'Boiler service',
      },
    ]);
    const fermenterIds = new Map<string, number>();
    for (const [i, [name, cap]] of DEMO_FERMENTERS.entries()) {
      const [row] = await tx.insert(t.fermenters).values({ workspaceId: wsId, name, capacityLitres: cap, position: i }).$returningId();
      fermenterIds.set(name, row!.id);
    }
    const washTypeIds = new Map<string, number>();
    for (const w of DEMO_WASH_TYPES) {
      const [row] = await tx
        .insert(t.washTypes)
        .values({ workspaceId: wsId, ...w })
        .$returningId();
      washTypeIds.set(w.category, row!.id);
    }
    const fermentIds = new Map<string, number>();
    for (const f of demoFerments(now)) {
      const [row] = await tx
        .insert(t.ferments)
        .values({
          workspaceId: wsId,
          code: f.code,
          washTypeId: washTypeIds.get(f.category)!,
          fermenterId: f.fermenter ? fermenterIds.get(f.fermenter)! : null,
          volumeLitres: f.volume,
          pitchedAt: f.pitchedAt,
          og: f.og,
          yeast: f.yeast,
          notes: f.notes || null,
          emptiedAt: f.emptiedAt,
          emptiedReason: f.emptiedAt ? 'distilled' : null,
          createdBy: userIds.get(DEMO_PEOPLE[1].email)!,
        })
        .$returningId();
      fermentIds.set(f.code, row!.id);
      if (f.ingredients.some(([, kg]) => kg > 0)) {
        await tx
          .insert(t.fermentIngredients)
          .values(f.ingredients.filter(([, kg]) => kg > 0).map(([name, kg]) => ({ workspaceId: wsId, fermentId: row!.id, name, quantityKg: kg })));
      }
      const rows = f.readings.map((r) => {
        const corrected = correctReading({
          value: r.sg,
          unit: 'sg',
          method: 'hydrometer',
          sampleTempC: 20,
          calibrationTempC: 20,
          wcf: 1.04,
          originalGravity: f.og,
          fermentationStarted: true,
        });
        return {
          workspaceId: wsId,
          fermentId: row!.id,
          takenAt: r.takenAt,
          method: 'hydrometer' as const,
          rawValue: r.sg,
          rawUnit: 'sg' as const,
          sampleTempC: 20,
          sampleTempUnit: 'C' as const,
          correctedSg: corrected.sg,
          lowConfidence: false,
          source: 'manual' as const,
          fermentTempC: r.tempC,
          ph: r.ph,
          takenBy: byIndex[r.by] ?? byIndex[2]!,
        };
      });
      if (rows.length) await tx.insert(t.readings).values(rows);
    }
    const runIds = new Map<string, number>();
    for (const r of demoRuns(now)) {
      const [row] = await tx
        .insert(t.runs)
        .values({
          workspaceId: wsId,
          stillId: stillIds.get(r.still)!,
          type: r.type,
          status: r.status,
          startsAt: r.startsAt,
          endsAt: r.endsAt,
          operatorId: r.operator ? userIds.get(r.operator)! : null,
          chargeLitres: r.chargeLitres,
          chargeAbv: r.chargeAbv,
          notes: r.notes || null,
          startedAt: r.status === 'done' ? r.startsAt : null,
          finishedAt: r.status === 'done' ? r.endsAt : null,
          createdBy: userIds.get(DEMO_PEOPLE[1].email)!,
        })
        .$returningId();
      runIds.set(r.key, row!.id);
      if (r.ferments.length)
        await tx
          .insert(t.runFerments)
          .values(r.ferments.map(([code, litres]) => ({ runId: row!.id, fermentId: fermentIds.get(code)!, workspaceId: wsId, litres })));
      if (r.feeds.length)
        await tx.insert(t.runFeeds).values(r.feeds.map(([key, litres]) => ({ runId: row!.id, feedRunId: runIds.get(key)!, workspaceId: wsId, litres })));
      if (r.outcomes?.length) {
        await tx.insert(t.runOutcomes).values(
          r.outcomes.map((o) => {
            const abv20 = alcoholmeterCorrection(o.reading, o.tempC);
            return {
              workspaceId: wsId,
              runId: row!.id,
              fraction: o.fraction,
              volumeLitres: o.litres,
              alcoholmeterReading: o.reading,
              readingTempC: o.tempC,
              abv20,
              laa: laa(o.litres, abv20),
              recordedBy: r.operator ? userIds.get(r.operator)! : null,
            };
          }),
        );
      }
    }
    await tx.insert(t.calendarFeeds).values({
      workspaceId: wsId,
      scope: 'workspace',
      name: 'Whole distillery',
      tokenHash: hashToken(feedToken),
      createdBy: userIds.get(DEMO_PEOPLE[0].email)!,
    });
    return wsId;
  });
  // Forecasts for every ferment, then what they would have said over the past weeks, so the
  // board has ready windows at once and the forecast-accuracy report has a history. (Only on the
  // app's own database: the forecaster reads and writes through it.)
  if (!opts.db) {
    const ids = (await db.select({ id: t.ferments.id }).from(t.ferments).where(eq(t.ferments.workspaceId, workspaceId))).map((r) => r.id);
    const ctx = systemCtx((await workspaceSettings(workspaceId))!);
    await getForecasts(ctx, ids, now);
    await getForecasts(ctx, ids, now); // again, now that finished washes inform the running ones
    await replayForecastHistory(ctx, ids, now);
    // Whether each run ahead was at risk as booked, judged like a booking made now, so the board
    // tells a run booked early from one whose wash fell late.
    const ahead = await db
      .select({ id: t.runs.id })
      .from(t.runs)
      .where(and(eq(t.runs.workspaceId, workspaceId), inArray(t.runs.status, ['planned', 'confirmed'])));
    await db.transaction(async (tx) => {
      for (const r of ahead) await recordRiskAtBooking(tx, ctx, r.id);
    });
  }
  const tokenFile = opts.tokenFile === undefined ? demoFeedTokenFile() : opts.tokenFile;
  if (tokenFile) {
    mkdirSync('.data', { recursive: true });
    writeFileSync(tokenFile, feedToken + '\n', { mode: 0o600 });
  }
  if (!opts.quiet) console.log(`[plateau] Demo distillery "${DEMO_WORKSPACE}" loaded.`);
  return { created: true, workspaceId, feedToken };
}

function addDaysUtc(d: Date, days: number): Date {
  return new Date(d.getTime() + days * 86400e3);
}
function dateOnly(d: Date): string {
  return d.toISOString().slice(0, 10);
}

const isMain = process.argv[1] && import.meta.url.endsWith(process.argv[1].replace(/^.*\/seed\//, '/seed/'));
if (isMain) {
  const force = process.argv.includes('--force');
  // The demo's sign-ins are published: it is loaded only in demo or development mode (fail closed).
  const mode = process.env.PLATEAU_MODE ?? 'production';
  if (mode !== 'demo' && mode !== 'development') {
    console.error(`[plateau] Not loading the demo distillery in ${mode} mode: its sign-ins are published. Set PLATEAU_MODE=demo (npm start does) to load it.`);
    process.exit(mode === 'production' ? 0 : 1);
  }
  loadDemo({ force })
    .then(async (r) => {
      if (!r.created) console.log('[plateau] Demo distillery already present; nothing to load.');
      await closeDb();
    })
    .catch(async (err) => {
      console.error(err);
      await closeDb();
      process.exit(1);
    });
}
