/**
 * Bad input never produces a number: every computation either throws this error (naming the
 * offending field, with an array index where there is one) or returns a documented empty result.
 */
export class ComputationInputError extends Error {
  readonly field: string;
  readonly value: unknown;

  constructor(field: string, message: string, value?: unknown) {
    super(`${field}: ${message}`);
    this.name = 'ComputationInputError';
    this.field = field;
    this.value = value;
  }
}

export function requireFinite(field: string, value: unknown): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new ComputationInputError(field, 'must be a finite number', value);
  }
  return value;
}

export function requireInRange(field: string, value: unknown, min: number, max: number): number {
  const v = requireFinite(field, value);
  if (v < min || v > max) {
    throw new ComputationInputError(field, `must be between ${min} and ${max}`, value);
  }
  return v;
}

export function requirePositive(field: string, value: unknown): number {
  const v = requireFinite(field, value);
  if (v <= 0) throw new ComputationInputError(field, 'must be greater than zero', value);
  return v;
}

export function requireNonNegative(field: string, value: unknown): number {
  const v = requireFinite(field, value);
  if (v < 0) throw new ComputationInputError(field, 'must not be negative', value);
  return v;
}

export function requirePositiveInteger(field: string, value: unknown): number {
  const v = requirePositive(field, value);
  if (!Number.isInteger(v)) throw new ComputationInputError(field, 'must be a whole number', value);
  return v;
}
