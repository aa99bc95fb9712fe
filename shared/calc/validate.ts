import { CalcError } from './errors';

// Small guards shared by the modules, so every public function rejects bad input the same way.

export function requireFinite(value: unknown, field: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new CalcError('not_finite', `${field} must be a finite number.`, field);
  }
  return value;
}

export function requirePositive(value: unknown, field: string): number {
  const v = requireFinite(value, field);
  if (v <= 0) throw new CalcError('non_positive', `${field} must be greater than zero.`, field);
  return v;
}

export function requireNonNegative(value: unknown, field: string): number {
  const v = requireFinite(value, field);
  if (v < 0) throw new CalcError('negative', `${field} must not be negative.`, field);
  return v;
}

export function requireLevel(level: unknown, field = 'level'): number {
  if (typeof level !== 'number' || !Number.isFinite(level) || level <= 0 || level >= 1) {
    throw new CalcError('bad_level', `${field} must be a probability between 0 and 1, e.g. 0.95.`, field);
  }
  return level;
}

export function requireNumberArray(values: unknown, field: string): number[] {
  if (!Array.isArray(values) || values.length === 0) {
    throw new CalcError('empty', `${field} must be a non-empty list of numbers.`, field);
  }
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new CalcError('not_finite', `${field} contains a value that is not a finite number (item ${i + 1}).`, field);
    }
  }
  return values as number[];
}
