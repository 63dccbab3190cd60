/**
 * Seeded generator of synthetic ferments for the backtest, from the published curve
 * models: the four-parameter logistic (Speers, Rogers & Smith 2003) and first-order
 * decay to a residual with a lag. Sampling imitates a distillery floor: one or two
 * hydrometer readings a day at working hours, fewer at weekends, hydrometer rounding
 * to 0.001, occasional misreads, some lower-confidence (refractometer) readings, and
 * some hourly logger series with sensor noise above 0.001 and spikes. Some ferments
 * stall above their wash type's range, some sour below it. Each ferment's true,
 * noiseless curve is recorded for the curve oracle.
 */
import { firstOrderAt, logisticAt } from './fit';
import { mulberry32, normal } from './prng';

export type WashType = 'sugar' | 'grain' | 'molasses' | 'fruit';

/** Product default terminal ranges (common practice). */
export const DEFAULT_RANGES: Record<WashType, { min: number; max: number }> = {
  sugar: { min: 0.99, max: 1.0 },
  grain: { min: 1.002, max: 1.008 },
  molasses: { min: 1.01, max: 1.02 },
  fruit: { min: 0.99, max: 0.996 },
};

const OG_RANGE: Record<WashType, [number, number]> = {
  sugar: [1.06, 1.09],
  grain: [1.05, 1.07],
  molasses: [1.065, 1.09],
  fruit: [1.07, 1.1],
};

export type TrueCurve =
  | { model: 'first_order'; og: number; fg: number; kPerDay: number; lagDays: number }
  | { model: 'logistic'; og: number; pi: number; pe: number; bPerDay: number; midDays: number };

export interface SyntheticTruth {
  id: string;
  washType: WashType;
  /** What the generator made: a normal ferment, one that stalls above the range, or one that sours below it. */
  kind: 'normal' | 'stall' | 'souring';
  sampling: 'hydrometer' | 'logger';
  pitchedAt: string;
  curve: TrueCurve;
}

export interface SyntheticReading {
  takenAt: Date;
  sg: number;
  lowConfidence: boolean;
}

export interface SyntheticFerment {
  truth: SyntheticTruth;
  readings: SyntheticReading[];
}

const DAY_MS = 86_400_000;

/** The true (noiseless) SG at `days` after pitch. */
export function trueSg(curve: TrueCurve, days: number): number {
  return curve.model === 'logistic'
    ? logisticAt(days, [curve.pi, curve.pe, Math.log(curve.bPerDay), curve.midDays])
    : firstOrderAt(days, [curve.fg, Math.log(curve.kPerDay), curve.lagDays], curve.og);
}

export interface GeneratorOptions {
  count: number;
  seed: number;
  stableDays?: number;
}

export function generateFerments({ count, seed, stableDays = 3 }: GeneratorOptions): SyntheticFerment[] {
  const rand = mulberry32(seed);
  const u = (a: number, b: number) => a + (b - a) * rand();
  const washes: WashType[] = ['sugar', 'grain', 'molasses', 'fruit'];
  const out: SyntheticFerment[] = [];
  const base = Date.UTC(2025, 0, 6); // a Monday
  for (let n = 0; n < count; n++) {
    const washType = washes[Math.floor(rand() * washes.length)];
    const range = DEFAULT_RANGES[washType];
    const r = rand();
    const kind: SyntheticTruth['kind'] = r < 0.12 ? 'stall' : r < 0.2 ? 'souring' : 'normal';
    const og = Math.round(u(...OG_RANGE[washType]) * 1000) / 1000;
    const fg = kind === 'stall' ? range.max + u(0.006, 0.02) : kind === 'souring' ? range.min - u(0.004, 0.01) : u(range.min + 0.0015, range.max - 0.0015);
    let curve: TrueCurve;
    if (rand() < 0.5) {
      curve = { model: 'first_order', og, fg, kPerDay: u(0.3, 0.9), lagDays: u(0.1, 1.5) };
    } else {
      const b = u(0.8, 2.2);
      const m = u(1.5, 5);
      curve = { model: 'logistic', og, pi: fg + (og - fg) * (1 + Math.exp(-b * m)), pe: fg, bPerDay: b, midDays: m };
    }
    // Run until well after the curve has flattened, plus a few days of readings.
    let flat = 0;
    while (flat < 60 && trueSg(curve, flat) - trueSg(curve, flat + stableDays) > 0.0002) flat += 0.25;
    const endDays = Math.min(40, flat + stableDays + u(1.5, 4));
    const pitchedAt = base + Math.floor(u(0, 150)) * DAY_MS + Math.round(u(7, 16) * 60) * 60_000;
    const logger = rand() < 0.15;
    const readings: SyntheticReading[] = [{ takenAt: new Date(pitchedAt), sg: og, lowConfidence: false }];
    const end = pitchedAt + endDays * DAY_MS;
    if (logger) {
      for (let t = pitchedAt + 3_600_000; t <= end; t += 3_600_000) {
        const at = t + Math.round(u(-5, 5)) * 60_000;
        let sg = trueSg(curve, (at - pitchedAt) / DAY_MS) + normal(rand) * 0.0015;
        if (rand() < 0.01) sg += u(0.005, 0.02);
        readings.push({ takenAt: new Date(at), sg: Math.round(sg * 10000) / 10000, lowConfidence: false });
      }
    } else {
      const refractometer = rand() < 0.2;
      const dayStart = Date.UTC(new Date(pitchedAt).getUTCFullYear(), new Date(pitchedAt).getUTCMonth(), new Date(pitchedAt).getUTCDate());
      for (let d = dayStart; d <= end; d += DAY_MS) {
        const dow = new Date(d).getUTCDay();
        const weekend = dow === 0 || dow === 6;
        const k = weekend ? (rand() < 0.5 ? 0 : 1) : rand() < 0.6 ? 1 : 2;
        const hours = Array.from({ length: k }, () => u(7, 17)).sort((a, b) => a - b);
        for (const h of hours) {
          const at = d + Math.round(h * 60) * 60_000;
          if (at <= pitchedAt + 3_600_000 || at > end) continue;
          const low = refractometer && rand() < 0.25;
          const sg = trueSg(curve, (at - pitchedAt) / DAY_MS) + normal(rand) * (low ? 0.0015 : 0.0003);
          readings.push({ takenAt: new Date(at), sg: Math.round(sg * 1000) / 1000, lowConfidence: low });
        }
      }
      if (rand() < 0.3 && readings.length > 6) {
        const i = 2 + Math.floor(rand() * (readings.length - 3));
        const off = u(0.004, 0.012) * (rand() < 0.5 ? -1 : 1);
        readings[i] = { ...readings[i], sg: Math.round((readings[i].sg + off) * 1000) / 1000 };
      }
    }
    out.push({
      truth: {
        id: `F${String(n + 1).padStart(3, '0')}`,
        washType,
        kind,
        sampling: logger ? 'logger' : 'hydrometer',
        pitchedAt: new Date(pitchedAt).toISOString(),
        curve,
      },
      readings,
    });
  }
  return out;
}

/** CSV in the backtest's format (an optional fifth column flags lower-confidence readings). */
export function toCsv(ferments: SyntheticFerment[]): string {
  const lines = ['ferment,wash_type,taken_at,sg,low_confidence'];
  for (const f of ferments)
    for (const r of f.readings)
      lines.push(`${f.truth.id},${f.truth.washType},${r.takenAt.toISOString().replace('.000Z', 'Z')},${r.sg},${r.lowConfidence ? 1 : ''}`);
  return lines.join('\n') + '\n';
}
