import { isRectboostError } from '../errors.js';

/** Exit statuses of every command: 0 success, 1 failure, 2 usage error. */
export const EXIT_SUCCESS = 0;
export const EXIT_FAILURE = 1;
export const EXIT_USAGE = 2;

/** Exit status for an error: usage errors (bad option values) get 2, all else 1. */
export function exitCodeFor(error: unknown): number {
  return isRectboostError(error, 'invalid-option') ? EXIT_USAGE : EXIT_FAILURE;
}

/** One line for stderr; the stack only when verbose. */
export function formatError(error: unknown, verbose: boolean): string {
  const message = error instanceof Error ? error.message : String(error);
  const line = `rectboost: ${message}`;
  if (!verbose || !(error instanceof Error) || error.stack === undefined) return line;
  return `${line}\n${error.stack}`;
}
