import { describe, expect, it } from 'vitest';
import { bubblePointC, estimateDurationMinutes } from '../../src/lib/schedule';

describe('estimateDurationMinutes (heat-up: t = m·cp·(T_boil − T0)/(P·η))', () => {
  // REFERENCES §7 check value [computed]: 100 L at FG 0.995, 8 % vol, 20 -> 94 °C, 10 kW, η = 1
  // -> 8.53 kWh, 51.2 min (cp 4.18 kJ/(kg·K), water, from memory; ρ = SG × ρ_water(20 °C)).
  const check = { chargeLitres: 100, washSg: 0.995, abvPercent: 8, startTempC: 20, heatingKw: 10, efficiency: 1, typicalMinutes: 0 };

  it('matches the REFERENCES §7 check value: 8.53 kWh, 51.2 min', () => {
    const e = estimateDurationMinutes(check);
    expect(e.energyKWh).toBeCloseTo(8.53, 2);
    expect(e.heatUpMinutes).toBeCloseTo(51.2, 1);
    expect(e.boilingPointC).toBeCloseTo(94.0, 6);
  });

  it('adds the time at the boil and rounds the total up to whole minutes', () => {
    // 51.2 min heat-up (REFERENCES §7) + 120 min -> 171.2 -> 172.
    expect(estimateDurationMinutes({ ...check, typicalMinutes: 120 }).totalMinutes).toBe(172);
  });

  it('divides by the efficiency: η = 0.8 turns 51.2 min into 64.0 min and draws 10.67 kWh', () => {
    // REFERENCES §7: 51.2 / 0.8 = 64.0 min; 8.53 / 0.8 ≈ 10.67 kWh drawn from the heater.
    const e = estimateDurationMinutes({ ...check, efficiency: 0.8 });
    expect(e.heatUpMinutes).toBeCloseTo(64.0, 1);
    expect(e.energyKWh).toBeCloseTo(10.67, 1);
  });

  it('defaults: SG 1.0, 20 °C, η 0.85', () => {
    // 100 L × 0.9982 kg/L × 4.18 × (94 − 20) / (10 kW × 0.85) / 60 = 60.54 min (hand-worked from the §7 formula).
    const e = estimateDurationMinutes({ chargeLitres: 100, abvPercent: 8, heatingKw: 10, typicalMinutes: 0 });
    expect(e.heatUpMinutes).toBeCloseTo(60.54, 1);
  });

  it('a charge already at its boil needs no heat-up', () => {
    expect(estimateDurationMinutes({ ...check, startTempC: 95, typicalMinutes: 30 })).toMatchObject({ heatUpMinutes: 0, totalMinutes: 30 });
  });

  it.each([{ chargeLitres: -1 }, { heatingKw: 0 }, { efficiency: 0 }, { efficiency: 1.2 }, { washSg: 0 }])('rejects %o', (bad) => {
    expect(() => estimateDurationMinutes({ ...check, ...bad })).toThrow(RangeError);
  });
});

describe('bubblePointC (ethanol–water at 1 atm)', () => {
  it.each([
    { abv: 8, celsius: 94.0, source: "Perry's tables, REFERENCES §7" },
    { abv: 10, celsius: 92.9, source: "Perry's tables, REFERENCES §7" },
    { abv: 0, celsius: 100, source: 'water boils at 100 °C at 1 atm (from memory)' },
    { abv: 100, celsius: 78.3, source: 'ethanol boils at about 78.3 °C (from memory), the clamp floor' },
    { abv: -5, celsius: 100, source: 'clamped' },
    { abv: 140, celsius: 78.3, source: 'clamped' },
  ])('$abv % vol -> $celsius °C ($source)', ({ abv, celsius }) => {
    expect(bubblePointC(abv)).toBeCloseTo(celsius, 6);
  });

  it('falls as strength rises through wash and low-wines strengths, within 78.3..100', () => {
    // Halfway between the 8 % and 10 % anchors the interpolated point lies between them.
    expect(bubblePointC(9)).toBeLessThan(94.0);
    expect(bubblePointC(9)).toBeGreaterThan(92.9);
    // Low wines around 25–30 % vol boil near 86–87 °C (Perry's ethanol–water data, from memory).
    expect(bubblePointC(28)).toBeGreaterThan(85);
    expect(bubblePointC(28)).toBeLessThan(87.5);
    for (let abv = 0; abv < 100; abv += 0.5) expect(bubblePointC(abv + 0.5)).toBeLessThanOrEqual(bubblePointC(abv));
  });
});
