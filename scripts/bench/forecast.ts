/**
 * Forecast backtest:
 *   npm run bench:forecast -- [folder] [--json] [--predictions FILE] [--no-history]
 * The folder holds CSV files with columns ferment,wash_type,taken_at,sg (ISO 8601 UTC;
 * first reading of a ferment = OG at pitch; an optional low_confidence column flags
 * lower-confidence readings). A truth.json beside them (synthetic sets) enables the
 * curve oracle. Default folder: tests/fixtures/ferments/synthetic. Each forecast is given its
 * wash type's past pitch-to-ready durations from the OTHER finished ferments of the folder
 * (leave-one-out, as baseline (a)); --no-history measures the forecast without them.
 */
import { readdirSync, readFileSync, writeFileSync, existsSync } from 'node:fs';
import { join } from 'node:path';
import { median } from 'simple-statistics';
import { forecastFerment } from '../../src/lib/forecast';
import { runBacktest, type BacktestFerment } from '../../src/lib/forecast/backtest';
import { DEFAULT_RANGES, generateFerments, type SyntheticTruth, type TrueCurve, type WashType } from '../../src/lib/forecast/synthetic';

export function readFermentFolder(folder: string): { ferments: BacktestFerment[]; truth: Map<string, TrueCurve> } {
  const byId = new Map<string, BacktestFerment>();
  for (const file of readdirSync(folder)
    .filter((f) => f.endsWith('.csv'))
    .sort()) {
    const lines = readFileSync(join(folder, file), 'utf8')
      .split(/\r?\n/)
      .filter((l) => l.trim());
    const head = lines[0].split(',').map((h) => h.trim());
    const col = (n: string) => head.indexOf(n);
    const [ci, cw, ct, cs, cl] = ['ferment', 'wash_type', 'taken_at', 'sg', 'low_confidence'].map(col);
    if (ci < 0 || cw < 0 || ct < 0 || cs < 0) throw new Error(`${file}: needs columns ferment,wash_type,taken_at,sg`);
    for (const line of lines.slice(1)) {
      const c = line.split(',');
      const id = `${c[ci]}`;
      const washType = c[cw] as WashType;
      if (!(washType in DEFAULT_RANGES)) throw new Error(`${file}: unknown wash type ${washType}`);
      const f = byId.get(id) ?? { id, washType, readings: [] };
      f.readings.push({ takenAt: new Date(c[ct]), sg: Number(c[cs]), lowConfidence: cl >= 0 && c[cl] === '1' });
      byId.set(id, f);
    }
  }
  const truth = new Map<string, TrueCurve>();
  const tf = join(folder, 'truth.json');
  if (existsSync(tf)) for (const t of JSON.parse(readFileSync(tf, 'utf8')).ferments as SyntheticTruth[]) truth.set(t.id, t.curve);
  return { ferments: [...byId.values()], truth };
}

/** Median time of one forecast on 40 hydrometer readings (interval included). */
export function timeOneForecast(runs = 300): number {
  // A logger series thinned to one reading every 8 hours: 40 readings over 13 days.
  const f = generateFerments({ count: 40, seed: 99 }).find((x) => x.truth.sampling === 'logger' && x.readings.length >= 320);
  if (!f) throw new Error('no ferment long enough to time');
  const readings = f.readings.filter((_, i) => i % 8 === 0).slice(0, 40);
  const input = {
    readings,
    og: readings[0].sg,
    pitchedAt: readings[0].takenAt,
    terminalRange: DEFAULT_RANGES[f.truth.washType],
    stableDays: 3,
    tolerance: 0.001,
    now: readings[39].takenAt,
  };
  for (let i = 0; i < 30; i++) forecastFerment(input);
  const ms: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    forecastFerment(input);
    ms.push(performance.now() - t0);
  }
  return median(ms);
}

function main() {
  const args = process.argv.slice(2);
  const json = args.includes('--json');
  const useHistory = !args.includes('--no-history');
  const pi = args.indexOf('--predictions');
  const predFile = pi >= 0 ? args[pi + 1] : null;
  const folder = args.find((a, i) => !a.startsWith('--') && !(pi >= 0 && i === pi + 1)) ?? 'tests/fixtures/ferments/synthetic';
  const { ferments, truth } = readFermentFolder(folder);
  const lines: string[] = [];
  const t0 = performance.now();
  const report = runBacktest(ferments, {
    ranges: DEFAULT_RANGES,
    truth,
    useHistory,
    onForecast: predFile
      ? (f, asOf, fc) =>
          lines.push(
            JSON.stringify({
              ferment: f.id,
              asOf: asOf.toISOString(),
              status: fc.status,
              readyAt: fc.readyAt?.toISOString() ?? null,
              readyP10: fc.readyP10?.toISOString() ?? null,
              readyP90: fc.readyP90?.toISOString() ?? null,
              predictedFg: fc.predictedFg?.value ?? null,
            }),
          )
      : undefined,
  });
  const wallMs = performance.now() - t0;
  if (predFile) writeFileSync(predFile, lines.join('\n') + '\n');
  const oneForecastMedianMs = timeOneForecast();
  const full = { folder, useHistory, ...report, timing: { ...report.timing, replayWallMs: wallMs, oneForecast40ReadingsMedianMs: oneForecastMedianMs } };
  if (json) {
    console.log(JSON.stringify(full));
    return;
  }
  const d = (x: number | null) => (x === null ? '   -  ' : x.toFixed(2).padStart(6));
  const pct = (x: number | null) => (x === null ? '-' : `${(100 * x).toFixed(1)} %`);
  console.log(`folder ${folder}: ${report.ferments} ferments, ${report.forecasts} forecasts${useHistory ? ', history leave-one-out' : ', no history'}`);
  console.log(`outcomes: ${JSON.stringify(report.outcome)}`);
  console.log('ready-time MAE (days)   ours  oracle  wash-median  last-two   (n)');
  for (const c of ['25', '50', '75'] as const) {
    const r = report.readyMaeDays[c];
    console.log(
      `  at ${c} % of the drop  ${d(r.ours.maeDays)}  ${d(r.oracle.maeDays)}  ${d(r.baselineWashMedian.maeDays)}      ${d(r.baselineLastTwo.maeDays)}   (${r.ours.n})`,
    );
  }
  console.log(
    `P10-P90 coverage: ${pct(report.coverage.p10p90)} of ${report.coverage.n} forecasts before ready; at checkpoints ${pct(report.coverage.atCheckpoints)} of ${report.coverage.nCheckpoints}`,
  );
  const s = report.stall;
  console.log(
    `stalls: precision ${pct(s.precision)}, recall ${pct(s.recall)} (${s.truePositives}/${s.actual}), median delay ${d(s.medianDelayDays)} d, max ${d(s.maxDelayDays)} d, finished reported stalled: ${s.finishedReportedStalled}`,
  );
  console.log(`souring: recall ${pct(report.souring.recall)} of ${report.souring.actual}, false flags ${report.souring.falsePositives}`);
  console.log(
    `time: replay ${wallMs.toFixed(0)} ms total, ${report.timing.meanMsPerForecast.toFixed(3)} ms per forecast; one forecast on 40 readings: median ${oneForecastMedianMs.toFixed(3)} ms`,
  );
}

if (process.argv[1] && import.meta.url.endsWith(process.argv[1].replace(/\\/g, '/').split('/').pop() as string)) main();
