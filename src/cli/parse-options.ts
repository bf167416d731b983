import { RectboostError } from '../errors.js';

/** Parses a whole number option in [min, max], or throws a usage error naming the option. */
export function parseInteger(option: string, text: string, min: number, max: number): number {
  const value = Number(text);
  if (text.trim() === '' || !Number.isInteger(value) || value < min || value > max) {
    throw new RectboostError('invalid-option', `${option} must be a whole number from ${min} to ${max}; received "${text}".`);
  }
  return value;
}

/** Parses a number option in [min, max], or throws a usage error naming the option. */
export function parseNumber(option: string, text: string, min: number, max: number): number {
  const value = Number(text);
  if (text.trim() === '' || !Number.isFinite(value) || value < min || value > max) {
    throw new RectboostError('invalid-option', `${option} must be a number from ${min} to ${max}; received "${text}".`);
  }
  return value;
}

/** Parses `WxH` (e.g. 24x24) into width and height within [min, max]. */
export function parseWindowSize(option: string, text: string, min: number, max: number): { width: number; height: number } {
  const match = /^(\d+)x(\d+)$/i.exec(text.trim());
  const width = match ? Number(match[1]) : NaN;
  const height = match ? Number(match[2]) : NaN;
  if (!match || width < min || width > max || height < min || height > max) {
    throw new RectboostError('invalid-option', `${option} must look like 24x24 with sides from ${min} to ${max}; received "${text}".`);
  }
  return { width, height };
}

/** Parses one of a fixed set of words, or throws a usage error listing them. */
export function parseChoice<T extends string>(option: string, text: string, choices: readonly T[]): T {
  if (!(choices as readonly string[]).includes(text)) {
    throw new RectboostError('invalid-option', `${option} must be one of ${choices.join(', ')}; received "${text}".`);
  }
  return text as T;
}
