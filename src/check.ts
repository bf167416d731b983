import { RectboostError } from './errors.js';

/**
 * Argument checks for public entry points. Hot loops never call these; each
 * public function checks its inputs once and then trusts them.
 * Every failure is a RectboostError with code `invalid-option`.
 */

function invalid(name: string, expected: string, received: unknown): RectboostError {
  return new RectboostError(
    'invalid-option',
    `${name} must be ${expected}; received ${describe(received)}.`,
  );
}

function describe(value: unknown): string {
  if (typeof value === 'string') return JSON.stringify(value);
  if (typeof value === 'number' || typeof value === 'boolean' || value === null || value === undefined) {
    return String(value);
  }
  return Object.prototype.toString.call(value);
}

/** Throws unless `value` is an integer in [min, max]. */
export function checkInteger(name: string, value: unknown, min: number, max: number): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < min || value > max) {
    throw invalid(name, `an integer from ${min} to ${max}`, value);
  }
  return value;
}

/** Throws unless `value` is a finite number in [min, max]. */
export function checkNumber(name: string, value: unknown, min: number, max: number): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < min || value > max) {
    throw invalid(name, `a finite number from ${min} to ${max}`, value);
  }
  return value;
}

/** Throws unless `value` is a finite number with min < value < max (open interval). */
export function checkOpenInterval(name: string, value: unknown, min: number, max: number): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= min || value >= max) {
    throw invalid(name, `a number strictly between ${min} and ${max}`, value);
  }
  return value;
}

/** Throws unless `value` is one of `allowed`. */
export function checkOneOf<T extends string>(name: string, value: unknown, allowed: readonly T[]): T {
  if (typeof value !== 'string' || !(allowed as readonly string[]).includes(value)) {
    throw invalid(name, `one of ${allowed.join(', ')}`, value);
  }
  return value as T;
}

/** Throws unless `condition` holds; `message` is the whole sentence. */
export function checkThat(condition: boolean, message: string): asserts condition {
  if (!condition) throw new RectboostError('invalid-option', message);
}
