/**
 * Load benchmark: realistic data in a workspace of its own (12 stills, 6 weeks of runs, 100
 * ferments with readings), then the board, reading entry, a logger CSV preview and a calendar
 * feed, each at 1, 10 and 50 concurrent connections for a bounded time. Loopback only.
 *
 *   node --import tsx scripts/bench/load.ts [--url http://127.0.0.1:4321] [--seconds 10] [--connections 1,10,50] [--json]
 *
 * The data goes into the database the app uses (DB_NAME / DATABASE_URL, as for the app).
 * Prints throughput, p50/p95/p99 latency, non-2xx answers and errors per scenario.
 */
import autocannon from 'autocannon';
import { getDb, closeDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { hashPassword } from '../../src/server/auth/password';

const args = process.argv.slice(2);
const arg = (name: string, fallback: string) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 && args[i + 1] ? args[i + 1]! : fallback;
};
const BASE = arg('url', process.env.PLATEAU_TEST_URL ?? 'http://127.0.0.1:4321').replace(/\/$/, '');
const SECONDS = Number(arg('seconds', '10'));
const CONNECTIONS = arg('connections', '1,10,50').split(',').map(Number);
const AS_JSON = args.includes('--json');
const host = new URL(BASE).hostname;
if (!['127.0.0.1', 'localhost', '::1', '[::1]'].includes(host)) {
  console.error('Loopback only: pass a --url on 127.0.0.1.');
  process.exit(2);
}

const DAY = 86_400_000;
const HOUR = 3_600_000;
const PASSWORD = 'load bench password 42';
const log = (s: string) => {
  if (!AS_JSON) console.log(s);
  else console.error(s);
};

interface Data {
  workspaceId: number;
  email: string;
  fermentIds: number[];
  pitchedAt: Map<number, number>;
}

async function buildData(): Promise<Data> {
  const db = getDb();
  const tag = Date.now().toString(36);
  const [ws] = await db
    .insert(t.workspaces)
    .values({ name: `Load bench ${tag}`, timeZone: 'Europe/London' })
    .$returningId();
  const workspaceId = ws!.id;
  const email = `load-${tag}@bench.example`;
  const [u] = await db
    .insert(t.users)
    .values({ email, name: 'Load Bench', passwordHash: await hashPassword(PASSWORD), emailVerifiedAt: new Date() })
    .$returningId();
  await db.insert(t.memberships).values({ workspaceId, userId: u!.id, role: 'manager' });
  const allWeek = [0, 1, 2, 3, 4, 5, 6].map((weekday) => ({ weekday, open: '00:00', close: '24:00' }));
  const stillIds: number[] = [];
  for (let i = 0; i < 12; i++) {
    const [s] = await db
      .insert(t.stills)
      .values({
        workspaceId,
        name: `Still ${i + 1}`,
        kind: i % 3 === 2 ? 'column' : 'pot',
        capacityLitres: 2000 + 250 * i,
        heatingKw: 60,
        operatingHours: allWeek,
        cleaningAfterRunMinutes: 60,
        typicalMinutes: { stripping: 300, spirit: 480, redistillation: 400, cleaning: 120, maintenance: 240 },
        position: i,
      })
      .$returningId();
    stillIds.push(s!.id);
  }
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
  // 100 ferments pitched over the last six weeks, readings twice a day on a first-order fall to 1.005.
  const now = Date.now();
  const fermentIds: number[] = [];
  const pitchedAt = new Map<number, number>();
  let readingRows = 0;
  for (let i = 0; i < 100; i++) {
    const pitched = now - (1.5 + (i * 40) / 100) * DAY;
    const active = i < 20;
    const [f] = await db
      .insert(t.ferments)
      .values({
        workspaceId,
        code: `LB-${i}`,
        washTypeId: wt!.id,
        fermenterId: active ? fermenterIds[i]! : null,
        volumeLitres: 2400,
        pitchedAt: new Date(pitched),
        og: 1.062,
        emptiedAt: null,
      })
      .$returningId();
    fermentIds.push(f!.id);
    pitchedAt.set(f!.id, pitched);
    const rows = [];
    for (let tm = pitched + 0.25 * DAY; tm < Math.min(now - HOUR, pitched + 8 * DAY); tm += 0.5 * DAY) {
      const sg = Math.round((1.005 + 0.057 * Math.exp(-0.9 * ((tm - pitched) / DAY))) * 1000) / 1000;
      rows.push({
        workspaceId,
        fermentId: f!.id,
        takenAt: new Date(tm),
        method: 'hydrometer' as const,
        rawValue: sg,
        rawUnit: 'sg' as const,
        correctedSg: sg,
        sampleTempC: 20,
        sampleTempUnit: 'C' as const,
      });
    }
    if (rows.length) {
      await db.insert(t.readings).values(rows);
      readingRows += rows.length;
    }
  }
  // Six weeks of runs (three weeks back, three ahead): one 5-hour run a day on each still, stripping runs charged from a ferment.
  const day0 = Math.floor((now - 21 * DAY) / DAY) * DAY;
  const runs: Array<typeof t.runs.$inferInsert> = [];
  for (let d = 0; d < 42; d++) {
    for (let s = 0; s < 12; s++) {
      const start = day0 + d * DAY + (6 + (s % 4)) * HOUR;
      runs.push({
        workspaceId,
        stillId: stillIds[s]!,
        type: s % 3 === 0 ? 'spirit' : 'stripping',
        status: start < now ? 'done' : 'planned',
        startsAt: new Date(start),
        endsAt: new Date(start + 5 * HOUR),
        chargeLitres: 1800,
        createdBy: u!.id,
      });
    }
  }
  const runIds: number[] = [];
  for (let i = 0; i < runs.length; i += 100) {
    const ids = await db
      .insert(t.runs)
      .values(runs.slice(i, i + 100))
      .$returningId();
    runIds.push(...ids.map((r) => r.id));
  }
  const lines = runIds.flatMap((runId, i) => (runs[i]!.type === 'stripping' ? [{ runId, workspaceId, fermentId: fermentIds[i % 100]!, litres: 1800 }] : []));
  for (let i = 0; i < lines.length; i += 200) await db.insert(t.runFerments).values(lines.slice(i, i + 200));
  log(`Built workspace ${workspaceId}: 12 stills, ${runs.length} runs over 6 weeks, 100 ferments, ${readingRows} readings`);
  return { workspaceId, email, fermentIds, pitchedAt };
}

async function signIn(email: string): Promise<string> {
  const r = await fetch(`${BASE}/api/auth/sign-in`, {
    method: 'POST',
    headers: { origin: BASE, 'content-type': 'application/json', accept: 'application/json' },
    body: JSON.stringify({ email, password: PASSWORD }),
  });
  if (r.status !== 200) throw new Error(`sign-in failed: ${r.status} ${await r.text()}`);
  const cookie = (r.headers.getSetCookie?.() ?? []).map((c) => c.split(';')[0]!).find((c) => c.startsWith('plateau_session='));
  if (!cookie) throw new Error('no session cookie');
  return cookie;
}

interface Row {
  scenario: string;
  connections: number;
  requests: number;
  reqPerSec: number;
  p50: number;
  p95: number;
  p99: number;
  non2xx: number;
  errors: number;
  timeouts: number;
}

const round = (x: number) => Math.round(x * 10) / 10;
const pct = (sorted: number[], q: number) => (sorted.length ? sorted[Math.min(sorted.length - 1, Math.ceil(q * sorted.length) - 1)]! : NaN);

async function measure(scenario: string, connections: number, opts: Partial<autocannon.Options> & { path?: string }): Promise<Row> {
  const latencies: number[] = [];
  const { path = '/', ...rest } = opts as Partial<autocannon.Options> & { path?: string };
  const instance = autocannon({ url: BASE + path, connections, duration: SECONDS, timeout: 10, ...rest } as autocannon.Options);
  instance.on('response', (_client: unknown, _status: number, _bytes: number, responseTime: number) => {
    latencies.push(responseTime);
  });
  const result = await instance;
  latencies.sort((a, b) => a - b);
  return {
    scenario,
    connections,
    requests: result.requests.total,
    reqPerSec: Math.round((result.requests.total / SECONDS) * 10) / 10,
    p50: round(pct(latencies, 0.5)),
    p95: round(pct(latencies, 0.95)),
    p99: round(pct(latencies, 0.99)),
    non2xx: result.non2xx,
    errors: result.errors,
    timeouts: result.timeouts,
  };
}

async function main() {
  const health = await fetch(`${BASE}/api/health`).catch(() => null);
  if (!health?.ok) throw new Error(`${BASE} is not answering /api/health`);
  const data = await buildData();
  const cookie = await signIn(data.email);
  const headers = { cookie, origin: BASE, accept: 'application/json' };
  const feed = await fetch(`${BASE}/api/feeds`, {
    method: 'POST',
    headers: { ...headers, 'content-type': 'application/json' },
    body: JSON.stringify({ scope: 'workspace', name: 'Load bench' }),
  });
  if (feed.status !== 201) throw new Error(`feed creation failed: ${feed.status} ${await feed.text()}`);
  const { token } = (await feed.json()) as { token: string };

  const from = new Date(Math.floor(Date.now() / DAY) * DAY - 21 * DAY).toISOString();
  const to = new Date(Math.floor(Date.now() / DAY) * DAY + 21 * DAY).toISOString();
  // Readings: each request a distinct ferment and minute, so none is refused as a duplicate or out of range.
  let n = 0;
  const readingRequest = (req: Record<string, unknown>) => {
    const i = n++;
    const fermentId = data.fermentIds[i % data.fermentIds.length]!;
    const takenAt = new Date(data.pitchedAt.get(fermentId)! + HOUR + Math.floor(i / data.fermentIds.length) * 1000).toISOString();
    return { ...req, path: `/api/ferments/${fermentId}/readings`, body: JSON.stringify({ value: 1.03, unit: 'sg', method: 'digital', takenAt }) };
  };
  // A 200-row logger file (one reading every 10 minutes), previewed only.
  const csvLines = ['time,value,unit,method'];
  const csvStart = Date.now() - 30 * HOUR;
  for (let i = 0; i < 200; i++) csvLines.push(`${new Date(csvStart + i * 600_000).toISOString()},${(1.03 - i * 0.0001).toFixed(4)},sg,digital`);
  const csv = csvLines.join('\n') + '\n';
  let u = 0;
  const uploadRequest = (req: Record<string, unknown>) => ({ ...req, path: `/api/ferments/${data.fermentIds[u++ % 20]}/uploads` });

  const scenarios: Array<[string, Partial<autocannon.Options> & { path?: string }]> = [
    ['GET /api/board (6 weeks)', { method: 'GET', path: `/api/board?from=${encodeURIComponent(from)}&to=${encodeURIComponent(to)}`, headers }],
    ['POST a reading', { method: 'POST', headers: { ...headers, 'content-type': 'application/json' }, requests: [{ setupRequest: readingRequest as never }] }],
    [
      'POST a CSV upload (preview, 200 rows)',
      { method: 'POST', headers: { ...headers, 'content-type': 'text/csv' }, body: csv, requests: [{ setupRequest: uploadRequest as never }] },
    ],
    ['GET calendar feed (.ics)', { method: 'GET', path: `/api/feeds/${token}.ics`, headers: { accept: 'text/calendar' } }],
  ];
  const rows: Row[] = [];
  for (const [name, opts] of scenarios) {
    for (const c of CONNECTIONS) {
      log(`  ${name} at ${c} connection${c > 1 ? 's' : ''} for ${SECONDS} s...`);
      rows.push(await measure(name, c, opts));
    }
  }
  if (AS_JSON) {
    console.log(JSON.stringify({ url: BASE, seconds: SECONDS, workspaceId: data.workspaceId, at: new Date().toISOString(), rows }, null, 2));
  } else {
    console.log(`\nLoad on ${BASE}, ${SECONDS} s per row (workspace ${data.workspaceId})\n`);
    console.log('| scenario | conns | requests | req/s | p50 ms | p95 ms | p99 ms | non-2xx | errors |');
    console.log('|---|--:|--:|--:|--:|--:|--:|--:|--:|');
    for (const r of rows)
      console.log(
        `| ${r.scenario} | ${r.connections} | ${r.requests} | ${r.reqPerSec} | ${r.p50} | ${r.p95} | ${r.p99} | ${r.non2xx} | ${r.errors + r.timeouts} |`,
      );
  }
  await closeDb();
  const bad = rows.filter((r) => r.errors + r.timeouts > 0 || r.non2xx > 0);
  if (bad.length) {
    console.error(`\n${bad.length} row(s) had errors or non-2xx answers.`);
    process.exitCode = 1;
  }
}

main().catch(async (err) => {
  console.error(err);
  await closeDb().catch(() => {});
  process.exit(1);
});
