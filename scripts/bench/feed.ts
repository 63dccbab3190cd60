/**
 * Feed build benchmark: a 2,000-event feed built N times (default 30).
 * Usage: node --import tsx scripts/bench/feed.ts [N]
 * Target: median under 100 ms.
 */
import { buildFeed, describeRunEvent, runEventTitle, uidForRun, type FeedEvent } from '../../src/lib/calendar/index';

const EVENTS = 2000;
const runs = Number(process.argv[2] ?? 30);
const base = Date.UTC(2026, 0, 5, 6, 0);

const events: FeedEvent[] = Array.from({ length: EVENTS }, (_, i) => {
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
        { code: `F-${i % 12}`, status: 'slowing', litres: 1200, readyAt: start, readyP10: new Date(start.getTime() - 86_400_000), readyP90: new Date(start.getTime() + 86_400_000), confirmedAt: null },
      ],
      chargeLitres: 1200,
      operatorName: 'Zoë Brennan',
      warnings: [{ severity: 'warning', message: 'Wash F-12 is not confirmed stable; wash at 21 °C, check again' }],
      url: `https://plateau.example/board?run=${i + 1}`,
      timeZone: 'Europe/London',
    }),
    location: 'Still house, bay 2',
    status: i % 5 === 0 ? 'CONFIRMED' : 'TENTATIVE',
    sequence: i % 4,
    lastModified: new Date(base),
  };
});

const now = new Date(base);
buildFeed({ name: 'Warm-up', events: events.slice(0, 50), now });
const times: number[] = [];
let bytes = 0;
for (let i = 0; i < runs; i++) {
  const t0 = performance.now();
  const text = buildFeed({ name: 'Plateau · all runs', events, now });
  times.push(performance.now() - t0);
  bytes = text.length;
}
times.sort((a, b) => a - b);
const pick = (q: number) => times[Math.min(times.length - 1, Math.ceil(q * times.length) - 1)];
console.log(`feed of ${EVENTS} events (${(bytes / 1024).toFixed(0)} KiB), ${runs} builds`);
console.log(`median ${pick(0.5).toFixed(1)} ms, p95 ${pick(0.95).toFixed(1)} ms, min ${times[0].toFixed(1)} ms, max ${times[times.length - 1].toFixed(1)} ms`);
