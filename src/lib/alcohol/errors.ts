/** An alcohol-strength input outside the range where the tables hold. */
export class AlcoholInputError extends RangeError {
  readonly field: string;

  constructor(field: string, message: string) {
    super(message);
    this.name = 'AlcoholInputError';
    this.field = field;
  }
}

export function requireRange(value: number, min: number, max: number, field: string, label: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new AlcoholInputError(field, `${label} must be a number.`);
  }
  if (value < min || value > max) {
    throw new AlcoholInputError(field, `${label} ${value} is outside ${min}–${max}.`);
  }
  return value;
}
