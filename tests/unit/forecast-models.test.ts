import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { fitModel, firstOrderAt, logisticAt } from '../../src/lib/forecast';

const H_PER_DAY = 24;

describe('four-parameter logistic (Speers, Rogers & Smith 2003; check values from REFERENCES §6)', () => {
  // Pi 12, Pe 2.5 °P, B 0.08 /h, M 60 h
  const th = [12, 2.5, Math.log(0.08), 60];
  it.each([
    [60, 7.25],
    [90, 3.2901],
    [120, 2.5775],
  ])('P(%i h) = %f', (t, expected) => {
    expect(logisticAt(t, th)).toBeCloseTo(expected, 4);
  });

  it('recovers the published parameters from a curve generated with them', () => {
    const t = Array.from({ length: 25 }, (_, i) => i * 6);
    const y = t.map((x) => 2.5 + 9.5 / (1 + Math.exp(0.08 * (x - 60))));
    const fit = fitModel('logistic', { t, y, w: t.map(() => 1) });
    expect(fit).not.toBeNull();
    const [pi, pe, lnB, m] = fit!.theta;
    expect(pi).toBeCloseTo(12, 3);
    expect(pe).toBeCloseTo(2.5, 3);
    expect(Math.exp(lnB)).toBeCloseTo(0.08, 4);
    expect(m).toBeCloseTo(60, 2);
  });
});

describe('first-order decay to a residual with lag (common empirical model; check values from REFERENCES §6)', () => {
  // OG 1.080, FG 0.995, k 0.5 /d, lag 0.5 d
  const th = [0.995, Math.log(0.5), 0.5];
  it('SG(3 d) = 1.01935', () => {
    expect(firstOrderAt(3, th, 1.08)).toBeCloseTo(1.01935, 5);
  });
  it('is within 0.001 of FG at 9.385 d, not before', () => {
    expect(firstOrderAt(9.385, th, 1.08) - 0.995).toBeCloseTo(0.001, 5);
    expect(firstOrderAt(9.0, th, 1.08) - 0.995).toBeGreaterThan(0.001);
  });
  it('holds at OG during the lag', () => {
    expect(firstOrderAt(0.4, th, 1.08)).toBe(1.08);
  });
  it('recovers FG, k and lag from readings of that curve rounded to 0.001 (hydrometer resolution)', () => {
    const t = Array.from({ length: 13 }, (_, i) => i);
    const y = t.map((d) => Math.round(firstOrderAt(d, th, 1.08) * 1000) / 1000);
    const fit = fitModel('first_order', { t, y, w: t.map(() => 1) }, { start: 1.08 });
    expect(fit).not.toBeNull();
    const [fg, lnK, lag] = fit!.theta;
    expect(Math.abs(fg - 0.995)).toBeLessThan(0.0007);
    expect(Math.abs(Math.exp(lnK) - 0.5)).toBeLessThan(0.03);
    expect(Math.abs(lag - 0.5)).toBeLessThan(0.15);
  });
  it('recovers the parameters from hourly points (time scale does not matter)', () => {
    const t = Array.from({ length: 50 }, (_, i) => i * 6);
    const y = t.map((h) => firstOrderAt(h / H_PER_DAY, th, 1.08));
    const fit = fitModel('first_order', { t: t.map((h) => h / H_PER_DAY), y, w: t.map(() => 1) }, { start: 1.08 });
    expect(fit!.theta[0]).toBeCloseTo(0.995, 5);
    expect(Math.exp(fit!.theta[1])).toBeCloseTo(0.5, 4);
    expect(fit!.theta[2]).toBeCloseTo(0.5, 3);
  });
});

describe('laboratory series (Valle et al., BEER 2024, BSD-2-Clause; data and licence in tests/fixtures/ferments/valle2024-mezcal/)', () => {
  // Mean total sugar (glucose + fructose) of the three replicates, g/L, every 8 h.
  const csv = readFileSync(fileURLToPath(new URL('../fixtures/ferments/valle2024-mezcal/data.csv', import.meta.url)), 'utf8');
  const rows = csv
    .trim()
    .split(/\r?\n/)
    .map((l) => l.split(',').map(Number));
  const t = rows.map((r) => r[0]);
  const y = rows.map((r) => (r[4] + r[5] + r[6] + r[7] + r[8] + r[9]) / 3);

  it('fits the real series with a four-parameter logistic: Si 121.1, Se 4.64, B 0.282 /h, M 17.0 h, RMS 0.89 [computed; the paper fits ODE models, not this]', () => {
    const fit = fitModel('logistic', { t, y, w: t.map(() => 1) });
    expect(fit).not.toBeNull();
    const [si, se, lnB, m] = fit!.theta;
    expect(si).toBeCloseTo(121.1, 0);
    expect(se).toBeCloseTo(4.64, 1);
    expect(Math.exp(lnB)).toBeCloseTo(0.282, 2);
    expect(m).toBeCloseTo(17.0, 1);
    expect(fit!.rmse).toBeCloseTo(0.89, 1);
  });
});
