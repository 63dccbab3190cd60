/**
 * Still heat-up estimate:  t_heat = m · cp · (T_boil − T0) / (P · η),  m = V · ρ_wash.
 */

/** Density of water at 20 °C, kg/L (Tanaka et al. 2001: 998.2067 kg/m³, rounded). */
export const WATER_DENSITY_20C_KG_PER_L = 0.9982;
/** Specific heat of a wash, taken as water's: 4.18 kJ/(kg·K). */
export const WASH_SPECIFIC_HEAT_KJ_PER_KG_K = 4.18;

/**
 * Bubble point of ethanol–water at 1 atm against strength in % vol.
 * Perry's liquid-phase mole fractions converted to % vol (ignoring volume
 * contraction), plus the two anchors 8 % -> 94.0 °C and 10 % -> 92.9 °C.
 * The minimum-boiling azeotrope (78.15 °C near 96 % vol) is flattened to
 * 78.3 °C, the clamp floor, so the curve stays monotone.
 */
const BUBBLE_POINT_TABLE: ReadonlyArray<readonly [abvPercent: number, celsius: number]> = [
  [0, 100.0],
  [5.9, 95.5],
  [8, 94.0],
  [10, 92.9],
  [20.1, 89.0],
  [25.7, 86.7],
  [31.4, 85.3],
  [39.2, 84.1],
  [49.7, 82.7],
  [61.1, 81.5],
  [77.0, 79.8],
  [87.1, 78.74],
  [96.5, 78.3],
  [100, 78.3],
];

/** Bubble point (°C) of a wash or low wines at `abvPercent` % vol; linear between table points, clamped to 78.3..100. */
export function bubblePointC(abvPercent: number): number {
  if (!Number.isFinite(abvPercent)) throw new RangeError('abvPercent must be a number');
  const abv = Math.min(100, Math.max(0, abvPercent));
  for (let i = 1; i < BUBBLE_POINT_TABLE.length; i++) {
    const [x1, y1] = BUBBLE_POINT_TABLE[i];
    if (abv <= x1) {
      const [x0, y0] = BUBBLE_POINT_TABLE[i - 1];
      const t = (abv - x0) / (x1 - x0);
      return Math.min(100, Math.max(78.3, y0 + t * (y1 - y0)));
    }
  }
  return 78.3;
}

export interface DurationEstimateInput {
  chargeLitres: number;
  /** Specific gravity of the charge (20/20); default 1.0. */
  washSg?: number;
  abvPercent: number;
  /** Charge temperature when heating starts; default 20 °C. */
  startTempC?: number;
  heatingKw: number;
  /** Share of the heating power that reaches the charge; default 0.85 (real stills lose 10–20 %). */
  efficiency?: number;
  /** Minutes the run takes once the charge is at the boil (the still's usual figure for the run type). */
  typicalMinutes: number;
}

export interface DurationEstimate {
  /** Time to bring the charge to its bubble point. */
  heatUpMinutes: number;
  /** Heat-up plus `typicalMinutes`, rounded up to whole minutes. */
  totalMinutes: number;
  /** Heating energy drawn during heat-up (P · t_heat = heat into the charge / η). */
  energyKWh: number;
  /** Bubble point used, °C. */
  boilingPointC: number;
  /** Mass of the charge, kg (V × SG × ρ_water(20 °C)). */
  chargeKg: number;
}

/**
 * Estimate a run's length from its charge and the still's heating power.
 * The charge's density is SG × ρ_water(20 °C) = SG × 0.9982 kg/L, since SG is
 * referred to water at 20 °C. A charge already at or above its bubble point
 * needs no heat-up.
 */
export function estimateDurationMinutes(input: DurationEstimateInput): DurationEstimate {
  const washSg = input.washSg ?? 1.0;
  const startTempC = input.startTempC ?? 20;
  const efficiency = input.efficiency ?? 0.85;
  if (!(input.chargeLitres >= 0)) throw new RangeError('chargeLitres must be zero or more');
  if (!(input.heatingKw > 0)) throw new RangeError('heatingKw must be above zero');
  if (!(efficiency > 0 && efficiency <= 1)) throw new RangeError('efficiency must be in (0, 1]');
  if (!(washSg > 0)) throw new RangeError('washSg must be above zero');
  if (!(input.typicalMinutes >= 0)) throw new RangeError('typicalMinutes must be zero or more');

  const boilingPointC = bubblePointC(input.abvPercent);
  const chargeKg = input.chargeLitres * washSg * WATER_DENSITY_20C_KG_PER_L;
  const riseK = Math.max(0, boilingPointC - startTempC);
  const heatIntoChargeKJ = chargeKg * WASH_SPECIFIC_HEAT_KJ_PER_KG_K * riseK;
  const heatUpSeconds = heatIntoChargeKJ / (input.heatingKw * efficiency);
  const heatUpMinutes = heatUpSeconds / 60;
  return {
    heatUpMinutes,
    totalMinutes: Math.ceil(heatUpMinutes + input.typicalMinutes - 1e-9),
    energyKWh: (input.heatingKw * heatUpSeconds) / 3600,
    boilingPointC,
    chargeKg,
  };
}
