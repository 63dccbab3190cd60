/**
 * Feed build benchmark: a 2,000-event feed, every VEVENT written by the ics package.
 * Usage: node --import tsx scripts/bench/feed.ts [N]
 *
 * cold: an empty event cache (first fetch after a restart): every event goes through ics.
 * warm: the realistic refresh: the cache holds the previous build and a few events changed
 *       since (a run moved, a ferment settled), so only those go through ics again.
 * Target: under 100 ms for the refresh.
 */
import { buildFeed, describeRunEvent, EventCache, runEventTitle, uidForRun, type FeedEvent } from '../../src/lib/calendar/index';

const EVENTS = 2000;
const CHANGED_PER_REFRESH = 5;
const runs = Number(process.argv[2] ?? 30);
const coldRuns = Math.max(3, Math.min(5, runs));
const base = Date.UTC(2026, 0, 5, 6, 0);

function makeEvent(i: number, sequence: number): FeedEvent {
  const start = new Date(base + i * 6 * 3_600_000);
  return {
    uid: uidForRun(i + 1, 7),
    start,
    end: new Date(start.getTime() + 5 * 3_600_000),
    title: runEventTitle(i % 3 === 0 ? 'spirit' : 'stripping', `Still ${(i % 4) + 1}`),
    description: describeRunEvent({
      runType: 'stripping',
      stillName: `Still ${(i % 4) + 1}`,
      ferments: [
        {
          code: `F-${i % 12}`,
          status: 'slowing',
          litres: 1200,
          readyAt: start,
          readyP10: new Date(start.getTime() - 86_400_000),
          readyP90: new Date(start.getTime() + 86_400_000),
          confirmedAt: null,
        },
      ],
      chargeLitres: 1200,
      operatorName: 'Zoë Brennan',
      warnings: [{ severity: 'warning', message: 'Wash F-12 is not confirmed stable; wash at 21 °C, check again' }],
      url: `https://plateau.example/runs/${i + 1}`,
      timeZone: 'Europe/London',
    }),
    location: 'Still house, bay 2',
    status: i % 5 === 0 ? 'CONFIRMED' : 'TENTATIVE',
    sequence,
    lastModified: new Date(base + sequence * 60_000),
  };
}

const events: FeedEvent[] = Array.from({ length: EVENTS }, (_, i) => makeEvent(i, i % 4));
const now = new Date(base);
const stats = (times: number[]) => {
  const sorted = [...times].sort((a, b) => a - b);
  const pick = (q: number) => sorted[Math.min(sorted.length - 1, Math.ceil(q * sorted.length) - 1)]!;
  return `median ${pick(0.5).toFixed(1)} ms, p95 ${pick(0.95).toFixed(1)} ms, min ${sorted[0]!.toFixed(1)} ms, max ${sorted[sorted.length - 1]!.toFixed(1)} ms`;
};

// Warm up the JIT on a small feed with its own cache.
buildFeed({ name: 'Warm-up', events: events.slice(0, 50), now }, new EventCache());

/** CPU time of this process in ms: on a shared, busy machine wall time also counts waiting for a core. */
const cpuMs = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
};

const cold: number[] = [];
const coldCpu: number[] = [];
let bytes = 0;
for (let i = 0; i < coldRuns; i++) {
  const cache = new EventCache(20_000);
  const t0 = performance.now();
  const c0 = cpuMs();
  bytes = Buffer.byteLength(buildFeed({ name: 'Plateau · all runs', events, now }, cache), 'utf8');
  coldCpu.push(cpuMs() - c0);
  cold.push(performance.now() - t0);
}

const cache = new EventCache(20_000);
buildFeed({ name: 'Plateau · all runs', events, now }, cache);
const warm: number[] = [];
const warmCpu: number[] = [];
const unchanged: number[] = [];
for (let i = 0; i < runs; i++) {
  // A few runs moved since the last fetch: their SEQUENCE went up.
  for (let k = 0; k < CHANGED_PER_REFRESH; k++) {
    const j = (i * 97 + k * 389) % EVENTS;
    events[j] = makeEvent(j, events[j]!.sequence + 1);
  }
  const t0 = performance.now();
  const c0 = cpuMs();
  buildFeed({ name: 'Plateau · all runs', events, now }, cache);
  warmCpu.push(cpuMs() - c0);
  warm.push(performance.now() - t0);
  const t1 = performance.now();
  buildFeed({ name: 'Plateau · all runs', events, now }, cache);
  unchanged.push(performance.now() - t1);
}

console.log(
  `feed of ${EVENTS} events (${(bytes / 1024).toFixed(0)} KiB), every VEVENT by ics 3.12.0; load average ${(await import('node:os')).loadavg()[0]!.toFixed(1)} on ${(await import('node:os')).cpus().length} cores`,
);
console.log(`cold (empty cache), ${coldRuns} builds: ${stats(cold)}; CPU ${stats(coldCpu)}`);
console.log(`warm (${CHANGED_PER_REFRESH} events changed since the last fetch), ${runs} builds: ${stats(warm)}; CPU ${stats(warmCpu)}`);
console.log(`warm (nothing changed), ${runs} builds: ${stats(unchanged)}`);

// After a restart with the blocks in the database (calendar_event_blocks): only when a
// database answers (DB_NAME / DB_SOCKET as for the app; `--db` to insist).
if (process.argv.includes('--db') || process.env.DB_NAME) {
  const { getDb, closeDb } = await import('../../src/db/client');
  const t = await import('../../src/db/schema');
  const { buildFeedWithStore } = await import('../../src/server/feed-blocks');
  const { eq } = await import('drizzle-orm');
  try {
    const [w] = await getDb()
      .insert(t.workspaces)
      .values({ name: `Feed bench ${Date.now().toString(36)}` })
      .$returningId();
    const input = { name: 'Plateau · all runs', events, now };
    await buildFeedWithStore(w!.id, input, new EventCache(20_000)); // stores every block
    const restart: number[] = [];
    for (let i = 0; i < coldRuns; i++) {
      const t0 = performance.now();
      const r = await buildFeedWithStore(w!.id, input, new EventCache(20_000));
      restart.push(performance.now() - t0);
      if (r.fromStore !== EVENTS) throw new Error(`expected ${EVENTS} stored blocks, got ${r.fromStore}`);
    }
    console.log(`cold after a restart, blocks read from MariaDB (${process.env.DB_NAME ?? 'plateau'}), ${coldRuns} builds: ${stats(restart)}`);
    await getDb().delete(t.workspaces).where(eq(t.workspaces.id, w!.id));
  } finally {
    await closeDb();
  }
}
