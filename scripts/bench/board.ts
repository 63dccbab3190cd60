/**
 * Board API benchmark. Builds a workspace of its own in the app's database (12 stills, six
 * weeks with about 500 runs, 100 ferments with twice-daily readings), warms the forecast cache,
 * then measures in the same run:
 *   1. GET /api/board for the six weeks at 20 concurrent connections (autocannon);
 *   2. the raw SQL that fetches the same rows, at 20 concurrent workers on the same pool size;
 *   3. the in-process getBoard() call, for the share the HTTP layer adds.
 *
 *   DB_NAME=plateau_<name> node --import tsx scripts/bench/board.ts [--url http://127.0.0.1:4503] [--seconds 10] [--connections 20]
 *
 * The API serves a payload from a short cache while the workspace's fingerprint (counts and
 * latest changes of its runs, stills, closures, ferments, forecasts, fermenters, members) is
 * unchanged, so the steady 30-second refresh of open boards costs one small query; the
 * in-process figure is the uncached build, paid once after each change.
 *
 * The API answers gzip-compressed when asked (browsers always ask) with a validator, so the
 * island's refresh revalidates and mostly gets 304; the three ways of asking are measured apart.
 * Loopback only. Targets: p95 < 50 ms and at most 2x the raw SQL.
 */
import autocannon from 'autocannon';
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { getDb, getPool, closeDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { hashPassword } from '../../src/server/auth/password';
import { getBoard } from '../../src/server/board';
import { systemCtx } from '../../src/server/context';
import { workspaceSettings } from '../../src/server/workspaces';

const args = process.argv.slice(2);
const arg = (name: string, fallback: string) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 && args[i + 1] ? args[i + 1]! : fallback;
};
const BASE = arg('url', process.env.PLATEAU_TEST_URL ?? 'http://127.0.0.1:4503').replace(/\/$/, '');
const SECONDS = Number(arg('seconds', '10'));
const CONNECTIONS = Number(arg('connections', '20'));
if (!['127.0.0.1', 'localhost'].includes(new URL(BASE).hostname)) {
  console.error('Loopback only.');
  process.exit(2);
}

const DAY = 86_400_000;
const HOUR = 3_600_000;
export const PASSWORD = 'board bench password 42';
const TZ = 'Europe/London';

export async function build() {
  const db = getDb();
  const tag = Date.now().toString(36);
  const [ws] = await db
    .insert(t.workspaces)
    .values({ name: `Board bench ${tag}`, timeZone: TZ })
    .$returningId();
  const workspaceId = ws!.id;
  const email = `board-bench-${tag}@bench.example`;
  const [u] = await db
    .insert(t.users)
    .values({ email, name: 'Board Bench', passwordHash: await hashPassword(PASSWORD), emailVerifiedAt: new Date() })
    .$returningId();
  await db.insert(t.memberships).values({ workspaceId, userId: u!.id, role: 'planner' });
  const hours = [1, 2, 3, 4, 5, 6].map((weekday) => ({ weekday, open: '05:00', close: '23:00' }));
  const stillIds: number[] = [];
  for (let i = 0; i < 12; i++) {
    const [s] = await db
      .insert(t.stills)
      .values({
        workspaceId,
        name: `Still ${i + 1}`,
        kind: i % 4 === 3 ? 'column' : 'pot',
        capacityLitres: 2500,
        heatingKw: 60,
        operatingHours: hours,
        cleaningAfterRunMinutes: 60,
        typicalMinutes: { stripping: 300, spirit: 480, redistillation: 400, cleaning: 120, maintenance: 240 },
        position: i,
      })
      .$returningId();
    stillIds.push(s!.id);
  }
  await db.insert(t.stillClosures).values({ workspaceId, stillId: null, startsOn: '2030-12-25', endsOn: '2030-12-26', reason: 'Holiday' });
  const [wt] = await db
    .insert(t.washTypes)
    .values({ workspaceId, name: 'All-grain wash', category: 'grain', terminalMin: 1.002, terminalMax: 1.008, typicalOg: 1.06 })
    .$returningId();
  const fermenterIds: number[] = [];
  for (let i = 0; i < 20; i++) {
    const [f] = await db
      .insert(t.fermenters)
      .values({ workspaceId, name: `FV${i + 1}`, capacityLitres: 3000, position: i })
      .$returningId();
    fermenterIds.push(f!.id);
  }
  const now = Date.now();
  const start = now - 7 * DAY;
  const fermentIds: number[] = [];
  let readingCount = 0;
  for (let i = 0; i < 100; i++) {
    const pitchedAt = start - 8 * DAY + i * 0.42 * DAY;
    const [f] = await db
      .insert(t.ferments)
      .values({
        workspaceId,
        code: `B-${i + 1}`,
        washTypeId: wt!.id,
        fermenterId: fermenterIds[i % 20]!,
        volumeLitres: 2400,
        pitchedAt: new Date(pitchedAt),
        og: 1.062,
        emptiedAt: pitchedAt + 9 * DAY < now ? new Date(pitchedAt + 9 * DAY) : null,
        emptiedReason: pitchedAt + 9 * DAY < now ? 'distilled' : null,
      })
      .$returningId();
    fermentIds.push(f!.id);
    const rows = [];
    for (let tt = pitchedAt + 0.3 * DAY; tt < Math.min(now, pitchedAt + 9 * DAY); tt += 0.5 * DAY) {
      const days = (tt - pitchedAt) / DAY;
      const sg = Math.round((1.005 + 0.057 * Math.exp(-0.8 * days)) * 1000) / 1000;
      rows.push({
        workspaceId,
        fermentId: f!.id,
        takenAt: new Date(tt),
        method: 'hydrometer' as const,
        rawValue: sg,
        rawUnit: 'sg' as const,
        correctedSg: sg,
        sampleTempC: 20,
        sampleTempUnit: 'C' as const,
      });
    }
    if (rows.length) await db.insert(t.readings).values(rows);
    readingCount += rows.length;
  }
  // One run a day on every still over six weeks (42 × 12 = 504), every other one charged from a ferment.
  let runCount = 0;
  // From a Monday, so the board's six-week view (Monday to Monday) shows every run at once.
  const midnight = Math.floor(start / DAY) * DAY;
  const dayZero = midnight - ((new Date(midnight).getUTCDay() + 6) % 7) * DAY;
  const values = [];
  for (let d = 0; d < 42; d++) {
    for (let s = 0; s < 12; s++) {
      const startsAt = new Date(dayZero + d * DAY + (6 + (s % 3)) * HOUR);
      values.push({
        workspaceId,
        stillId: stillIds[s]!,
        type: 'stripping' as const,
        status: 'planned' as const,
        startsAt,
        endsAt: new Date(startsAt.getTime() + 6 * HOUR),
        chargeLitres: 2400,
        operatorId: u!.id,
      });
    }
  }
  for (let i = 0; i < values.length; i += 100) {
    const chunk = values.slice(i, i + 100);
    await db.insert(t.runs).values(chunk);
    runCount += chunk.length;
  }
  const runRows = await db
    .select({ id: t.runs.id })
    .from(t.runs)
    .where((await import('drizzle-orm')).eq(t.runs.workspaceId, workspaceId));
  const links = runRows.filter((_, i) => i % 2 === 0).map((r, i) => ({ runId: r.id, fermentId: fermentIds[i % 100]!, workspaceId, litres: 1200 }));
  await db.insert(t.runFerments).values(links);
  return { workspaceId, email, from: new Date(dayZero), to: new Date(dayZero + 42 * DAY), runCount, readingCount };
}

function pct(values: number[], p: number): number {
  const s = [...values].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))]!;
}

async function rawSql(workspaceId: number, from: Date, to: Date): Promise<void> {
  const pool = getPool();
  const ctxFrom = new Date(from.getTime() - 3 * DAY);
  const ctxTo = new Date(to.getTime() + 3 * DAY);
  const [runs] = (await pool.query(
    'SELECT id, still_id, type, status, starts_at, ends_at, operator_id, charge_litres, charge_abv, version, sequence, notes FROM runs WHERE workspace_id = ? AND starts_at < ? AND ends_at > ? ORDER BY starts_at, id',
    [workspaceId, ctxTo, ctxFrom],
  )) as unknown as [Array<{ id: number }>];
  const ids = (runs as Array<{ id: number }>).map((r) => r.id);
  await Promise.all([
    pool.query('SELECT * FROM stills WHERE workspace_id = ? AND active = 1 ORDER BY position, id', [workspaceId]),
    pool.query('SELECT id, still_id, starts_on, ends_on, reason FROM still_closures WHERE workspace_id = ?', [workspaceId]),
    pool.query('SELECT run_id, ferment_id, litres FROM run_ferments WHERE workspace_id = ? AND run_id IN (?)', [workspaceId, ids.length ? ids : [0]]),
    pool.query('SELECT run_id, feed_run_id, litres FROM run_feeds WHERE workspace_id = ? AND run_id IN (?)', [workspaceId, ids.length ? ids : [0]]),
    pool.query(
      'SELECT f.id, f.code, f.volume_litres, f.fermenter_id, w.category, f.pitched_at, f.emptied_at, c.status, c.ready_at, c.ready_p10, c.ready_p90, c.rule_met_at, c.predicted_fg FROM ferments f JOIN wash_types w ON w.id = f.wash_type_id LEFT JOIN ferment_forecasts c ON c.ferment_id = f.id WHERE f.workspace_id = ? AND f.pitched_at < ? AND (f.emptied_at IS NULL OR f.emptied_at >= ?)',
      [workspaceId, ctxTo, ctxFrom],
    ),
    pool.query('SELECT id, name, capacity_litres FROM fermenters WHERE workspace_id = ? AND active = 1 ORDER BY position, id', [workspaceId]),
    pool.query('SELECT u.id, u.name, m.role FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.workspace_id = ?', [workspaceId]),
  ]);
}

async function concurrently(workers: number, seconds: number, fn: () => Promise<void>): Promise<number[]> {
  const times: number[] = [];
  const until = performance.now() + seconds * 1000;
  await Promise.all(
    Array.from({ length: workers }, async () => {
      while (performance.now() < until) {
        const t0 = performance.now();
        await fn();
        times.push(performance.now() - t0);
      }
    }),
  );
  return times;
}

interface LoadResult {
  count: number;
  perSecond: number;
  p50: number;
  p95: number;
  p99: number;
  statuses: Record<string, number>;
  errors: number;
  bytesPerResponse: number;
}

/** autocannon at CONNECTIONS for SECONDS; percentiles from every response's own time (exact p95). */
async function loadTest(url: string, headers: Record<string, string>): Promise<LoadResult> {
  const times: number[] = [];
  const statuses: Record<string, number> = {};
  let bytes = 0;
  const instance = autocannon({ url, connections: CONNECTIONS, duration: SECONDS, headers });
  instance.on('response', (_client: unknown, status: number, resBytes: number, responseTime: number) => {
    times.push(responseTime);
    statuses[status] = (statuses[status] ?? 0) + 1;
    bytes += resBytes;
  });
  const result = await instance;
  return {
    count: times.length,
    perSecond: times.length / SECONDS,
    p50: pct(times, 50),
    p95: pct(times, 95),
    p99: pct(times, 99),
    statuses,
    errors: result.errors,
    bytesPerResponse: times.length ? bytes / times.length : 0,
  };
}

/** The same load from wrk when it is installed (Debian package `wrk`); null otherwise. */
function wrkRun(url: string, headers: Record<string, string>): string | null {
  if (spawnSync('wrk', ['--version']).error) return null;
  const dir = mkdtempSync(join(tmpdir(), 'plateau-wrk-'));
  const script = join(dir, 'p95.lua');
  writeFileSync(
    script,
    `done = function(summary, latency, requests)
  io.write(string.format("%d requests, %.0f req/s, non-2xx %d, errors %d\\n    latency p50 %.1f ms, p95 %.1f ms, p99 %.1f ms\\n",
    summary.requests, summary.requests / (summary.duration / 1e6), summary.errors.status,
    summary.errors.connect + summary.errors.read + summary.errors.write + summary.errors.timeout,
    latency:percentile(50) / 1000, latency:percentile(95) / 1000, latency:percentile(99) / 1000))
end
`,
  );
  const args = ['-t1', `-c${CONNECTIONS}`, `-d${SECONDS}s`, '-s', script];
  for (const [k, v] of Object.entries(headers)) args.push('-H', `${k}: ${v}`);
  const out = execFileSync('wrk', [...args, url], { encoding: 'utf8' });
  return out
    .trim()
    .split('\n')
    .slice(-2)
    .map((l) => l.trim())
    .join('\n    ');
}

async function main() {
  console.log(`Building the bench workspace in ${process.env.DB_NAME ?? 'plateau'}…`);
  const data = await build();
  const settings = await workspaceSettings(data.workspaceId);
  if (!settings) throw new Error('The bench workspace was not created.');
  const scope = systemCtx(settings);
  const warm = await getBoard(scope, data.from, data.to);
  console.log(
    `Workspace ${data.workspaceId}: 12 stills, ${data.runCount} runs, 100 ferments, ${data.readingCount} readings; the six-week board holds ${warm.runs.length} runs and ${warm.ferments.length} ferments (${(JSON.stringify(warm).length / 1024).toFixed(0)} kB JSON).`,
  );

  const signIn = await fetch(`${BASE}/api/auth/sign-in`, {
    method: 'POST',
    headers: { origin: BASE, 'content-type': 'application/json', accept: 'application/json' },
    body: JSON.stringify({ email: data.email, password: PASSWORD }),
  });
  const cookie = (signIn.headers.getSetCookie?.() ?? []).map((c) => c.split(';')[0]).find((c) => c?.startsWith('plateau_session='));
  if (!cookie) throw new Error(`sign-in failed: ${signIn.status}`);
  const path = `/api/board?from=${encodeURIComponent(data.from.toISOString())}&to=${encodeURIComponent(data.to.toISOString())}`;
  const probe = await fetch(BASE + path, { headers: { cookie } });
  if (probe.status !== 200) throw new Error(`board answered ${probe.status}`);

  // Raw SQL first and last, so a warm-up effect cannot flatter either side.
  const raw1 = await concurrently(CONNECTIONS, Math.max(3, SECONDS / 2), () => rawSql(data.workspaceId, data.from, data.to));
  // As a browser asks: gzip accepted, a full 200 every time (no validator sent).
  const api = await loadTest(BASE + path, { cookie, 'accept-encoding': 'gzip, deflate, br' });
  const raw2 = await concurrently(CONNECTIONS, Math.max(3, SECONDS / 2), () => rawSql(data.workspaceId, data.from, data.to));
  const raw = [...raw1, ...raw2];
  // A client that does not accept gzip, and the island's periodic refresh (If-None-Match -> 304).
  const plain = await loadTest(BASE + path, { cookie });
  const etag = (await fetch(BASE + path, { headers: { cookie } })).headers.get('etag') ?? '';
  const revalidate = await loadTest(BASE + path, { cookie, 'accept-encoding': 'gzip', 'if-none-match': etag });
  const viaWrk = wrkRun(BASE + path, { cookie, 'accept-encoding': 'gzip' });
  const inproc = await concurrently(CONNECTIONS, Math.max(3, SECONDS / 2), async () => {
    await getBoard(scope, data.from, data.to);
  });

  const rawP50 = pct(raw, 50);
  const rawP95 = pct(raw, 95);
  const line = (name: string, r: LoadResult) =>
    `  ${name}: ${r.count} requests, ${r.perSecond.toFixed(0)} req/s, status ${JSON.stringify(r.statuses)}, errors ${r.errors}, ${(r.bytesPerResponse / 1024).toFixed(1)} kB/response\n` +
    `    latency p50 ${r.p50.toFixed(1)} ms, p95 ${r.p95.toFixed(1)} ms, p99 ${r.p99.toFixed(1)} ms`;
  console.log('');
  console.log(`GET /api/board (six weeks), ${CONNECTIONS} connections, ${SECONDS} s each, against ${BASE}:`);
  console.log(line('gzip accepted, full 200s (a browser loading the board)', api));
  console.log(line('no compression, full 200s', plain));
  console.log(line('revalidation with If-None-Match (the 30-second refresh)', revalidate));
  if (viaWrk) console.log(`  the same with wrk (a C load generator, so less of the two cores goes to the load itself), gzip, full 200s:\n    ${viaWrk}`);
  else console.log('  (wrk not installed: `apt-get install wrk` adds a second measurement with a lighter load generator)');
  console.log(`Raw SQL for the same rows, ${CONNECTIONS} workers: p50 ${rawP50.toFixed(1)} ms, p95 ${rawP95.toFixed(1)} ms (${raw.length} fetches)`);
  console.log(
    `getBoard() in process, uncached (what a change costs), ${CONNECTIONS} workers: p50 ${pct(inproc, 50).toFixed(1)} ms, p95 ${pct(inproc, 95).toFixed(1)} ms (${inproc.length} calls)`,
  );
  console.log(
    `Ratio API p95 / raw SQL p95: ${(api.p95 / rawP95).toFixed(2)} (uncompressed ${(plain.p95 / rawP95).toFixed(2)}); in-process p95 / raw p95: ${(pct(inproc, 95) / rawP95).toFixed(2)}`,
  );
  console.log(
    `Target p95 < 50 ms: ${api.p95 < 50 ? 'met' : 'NOT met'} (gzip), ${plain.p95 < 50 ? 'met' : 'NOT met'} (uncompressed), ${revalidate.p95 < 50 ? 'met' : 'NOT met'} (revalidation)`,
  );
  await closeDb();
}

if (process.argv[1]?.endsWith('board.ts'))
  main().catch(async (err) => {
    console.error(err);
    await closeDb();
    process.exit(1);
  });
