import { abv, apparentAttenuation } from '../../lib/gravity';
import { laa } from '../../lib/alcohol';

export interface FermentStats {
  currentSg: number | null;
  attenuation: number | null;
  abvNow: number | null;
  expectedFg: number;
  expectedFgSource: 'forecast' | 'range';
  abvAtFg: number | null;
  laaNow: number | null;
  laaAtFg: number | null;
}

const safe = (f: () => number): number | null => {
  try {
    const v = f();
    return Number.isFinite(v) ? v : null;
  } catch {
    return null;
  }
};

/**
 * Figures for the ferment page. ABV by the product's formula (ABV_FORMULA_NAME); a reading
 * at or above the OG gives 0 % rather than a negative figure. LAA = volume × ABV / 100.
 */
export function fermentStats(
  og: number,
  volumeLitres: number,
  currentSg: number | null,
  predictedFg: number | null,
  range: { min: number; max: number },
): FermentStats {
  const expectedFg = predictedFg ?? (range.min + range.max) / 2;
  const abvOf = (sg: number) => (sg >= og ? 0 : safe(() => abv(og, sg)));
  const abvNow = currentSg === null ? null : abvOf(currentSg);
  const abvAtFg = abvOf(Math.min(expectedFg, og));
  return {
    currentSg,
    attenuation: currentSg === null ? null : safe(() => apparentAttenuation(og, Math.min(currentSg, og))),
    abvNow,
    expectedFg,
    expectedFgSource: predictedFg === null ? 'range' : 'forecast',
    abvAtFg,
    laaNow: abvNow === null ? null : safe(() => laa(volumeLitres, abvNow)),
    laaAtFg: abvAtFg === null ? null : safe(() => laa(volumeLitres, abvAtFg)),
  };
}
