/**
 * Writes a folder of synthetic ferments for the forecast backtest:
 *   node --import tsx scripts/bench/synthetic-ferments.ts [--out DIR] [--count N] [--seed S]
 * Defaults: tests/fixtures/ferments/synthetic, 60 ferments, seed 1 (the committed set).
 * Files: ferments.csv (ferment,wash_type,taken_at,sg,low_confidence) and truth.json
 * (each ferment's true curve, for the curve oracle). See src/lib/forecast/synthetic.ts.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { generateFerments, toCsv } from '../../src/lib/forecast/synthetic';

function arg(name: string, fallback: string): string {
  const i = process.argv.indexOf(name);
  return i >= 0 && process.argv[i + 1] ? process.argv[i + 1] : fallback;
}

const out = arg('--out', 'tests/fixtures/ferments/synthetic');
const count = Number(arg('--count', '60'));
const seed = Number(arg('--seed', '1'));
const ferments = generateFerments({ count, seed });
mkdirSync(out, { recursive: true });
writeFileSync(join(out, 'ferments.csv'), toCsv(ferments));
writeFileSync(
  join(out, 'truth.json'),
  JSON.stringify({ generator: 'src/lib/forecast/synthetic.ts', seed, count, ferments: ferments.map((f) => f.truth) }, null, 1) + '\n',
);
console.log(`wrote ${count} ferments (seed ${seed}) to ${out}`);
