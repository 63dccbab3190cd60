/** A gravity-related input outside the range where the formulas hold. */
export class GravityInputError extends RangeError {
  readonly field: string;

  constructor(field: string, message: string) {
    super(message);
    this.name = 'GravityInputError';
    this.field = field;
  }
}

export function requireFinite(value: number, field: string, label: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new GravityInputError(field, `${label} must be a number.`);
  }
  return value;
}

export function requireRange(value: number, min: number, max: number, field: string, label: string): number {
  requireFinite(value, field, label);
  if (value < min || value > max) {
    throw new GravityInputError(field, `${label} ${value} is outside ${min}–${max}.`);
  }
  return value;
}
