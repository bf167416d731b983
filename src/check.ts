import { RectboostError, type RectboostErrorCode } from './errors.js';

/**
 * The one home of value checks: options of public entry points, and the fields of
 * files rectboost reads (models, runtime cascades). Hot loops never call these; each
 * public function checks its inputs once and then trusts them.
 *
 * One error factory (checkFailure) words every failure the same way:
 *   option:     `rounds must be an integer from 1 to 100000; received 0.`
 *   file field: `Model m.json: field stages[3].weakClassifiers[7].splitValue must be a finite
 *               number; received "NaN". <what to do>`
 */

/** Where checked values come from, for the messages of a FieldChecks. */
export interface CheckSource {
  /** The error code of every failure: `invalid-option` for arguments, `bad-model` for model files, … */
  readonly code: RectboostErrorCode;
  /** Names the file or object the fields belong to, e.g. `Model m.json`; absent for options. */
  readonly source?: string;
  /** One sentence on what to do, appended to every message. */
  readonly remedy?: string;
}

/**
 * The error factory behind every check: `<where> <problem>. <remedy>`, where `<where>`
 * is the option name, or `<source>: field <path>` (`the top level` for path '').
 */
export function checkFailure(from: CheckSource, field: string, problem: string): RectboostError {
  const where = from.source === undefined ? field : `${from.source}: ${field === '' ? 'the top level' : `field ${field}`}`;
  return new RectboostError(from.code, `${where} ${problem}.${from.remedy === undefined ? '' : ` ${from.remedy}`}`);
}

/** A received value as a message shows it: strings quoted, long JSON cut at 60 characters. */
export function describeValue(value: unknown): string {
  if (typeof value === 'number' || typeof value === 'boolean' || value === null || value === undefined) return String(value);
  let text: string | undefined;
  try {
    text = JSON.stringify(value);
  } catch {
    text = undefined;
  }
  if (text === undefined) return Object.prototype.toString.call(value);
  return text.length > 60 ? `${text.slice(0, 57)}...` : text;
}

/**
 * Checks named by field path; every failure is checkFailure(from, path, …). Each method
 * returns the value with its checked type, so a validator reads as the layout it checks.
 * @example new FieldChecks({ code: 'bad-model', source: 'Model m.json' }).integer(raw.width, 'window.width', 1, 64)
 */
export class FieldChecks {
  constructor(private readonly from: CheckSource) {}

  /** Throws for field `path` with `problem` (a phrase such as `is missing`). */
  fail(path: string, problem: string): never {
    throw checkFailure(this.from, path, problem);
  }

  /** Throws `path must be <expected>; received <value>`. */
  expected(path: string, expected: string, received: unknown): never {
    return this.fail(path, `must be ${expected}; received ${describeValue(received)}`);
  }

  /**
   * A plain object with every `required` key. Any key outside required ∪ optional is
   * refused (so typos do not pass silently), unless `optional` is null (free-form keys).
   */
  object(value: unknown, path: string, required: readonly string[], optional: readonly string[] | null): Record<string, unknown> {
    if (typeof value !== 'object' || value === null || Array.isArray(value)) return this.expected(path, 'an object', value);
    const record = value as Record<string, unknown>;
    for (const key of required) {
      if (!(key in record)) this.fail(childPath(path, key), 'is missing');
    }
    if (optional !== null) {
      for (const key of Object.keys(record)) {
        if (!required.includes(key) && !optional.includes(key)) this.fail(childPath(path, key), 'is not a known field');
      }
    }
    return record;
  }

  /** An array of at most `maxLength` entries (checked before anything walks it). */
  array(value: unknown, path: string, maxLength: number): unknown[] {
    if (!Array.isArray(value)) return this.expected(path, 'an array', value);
    if (value.length > maxLength) this.fail(path, `has ${value.length} entries, above the limit of ${maxLength}`);
    return value;
  }

  /** A finite number. */
  finite(value: unknown, path: string): number {
    if (typeof value !== 'number' || !Number.isFinite(value)) return this.expected(path, 'a finite number', value);
    return value;
  }

  /** A finite number in [min, max]. */
  numberIn(value: unknown, path: string, min: number, max: number): number {
    if (typeof value !== 'number' || !Number.isFinite(value) || value < min || value > max) {
      return this.expected(path, `a finite number from ${min} to ${max}`, value);
    }
    return value;
  }

  /** A finite number with min < value < max. */
  openInterval(value: unknown, path: string, min: number, max: number): number {
    if (typeof value !== 'number' || !Number.isFinite(value) || value <= min || value >= max) {
      return this.expected(path, `a number strictly between ${min} and ${max}`, value);
    }
    return value;
  }

  /** An integer in [min, max]. */
  integer(value: unknown, path: string, min: number, max: number): number {
    if (typeof value !== 'number' || !Number.isInteger(value) || value < min || value > max) {
      return this.expected(path, `an integer from ${min} to ${max}`, value);
    }
    return value;
  }

  /** A string of at most `maxLength` characters (default 10,000). */
  string(value: unknown, path: string, maxLength = 10_000): string {
    if (typeof value !== 'string' || value.length > maxLength) return this.expected(path, `a string of at most ${maxLength} characters`, value);
    return value;
  }

  /** One of `allowed`. */
  oneOf<T extends string>(value: unknown, path: string, allowed: readonly T[]): T {
    if (typeof value !== 'string' || !(allowed as readonly string[]).includes(value)) {
      return this.expected(path, `one of ${allowed.join(', ')}`, value);
    }
    return value as T;
  }

  /** Exactly `wanted` (a format tag, a version). */
  constant<T extends string | number>(value: unknown, path: string, wanted: T, why = ''): T {
    if (value !== wanted) this.fail(path, `must be ${JSON.stringify(wanted)}; received ${describeValue(value)}${why === '' ? '' : `; ${why}`}`);
    return wanted;
  }
}

function childPath(path: string, key: string): string {
  return path === '' ? key : `${path}.${key}`;
}

/** Options of public entry points: failures are `invalid-option`, named by the option. */
const OPTIONS = new FieldChecks({ code: 'invalid-option' });

/** Throws unless `value` is an integer in [min, max]. */
export function checkInteger(name: string, value: unknown, min: number, max: number): number {
  return OPTIONS.integer(value, name, min, max);
}

/** Throws unless `value` is a finite number in [min, max]. */
export function checkNumber(name: string, value: unknown, min: number, max: number): number {
  return OPTIONS.numberIn(value, name, min, max);
}

/** Throws unless `value` is a finite number with min < value < max (open interval). */
export function checkOpenInterval(name: string, value: unknown, min: number, max: number): number {
  return OPTIONS.openInterval(value, name, min, max);
}

/** Throws unless `value` is one of `allowed`. */
export function checkOneOf<T extends string>(name: string, value: unknown, allowed: readonly T[]): T {
  return OPTIONS.oneOf(value, name, allowed);
}

/** Throws unless `condition` holds; `message` is the whole sentence. */
export function checkThat(condition: boolean, message: string): asserts condition {
  if (!condition) throw new RectboostError('invalid-option', message);
}
