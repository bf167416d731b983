/**
 * The one error type that rectboost throws on purpose. Its `code` says which
 * kind of problem it is, so that the CLI can pick an exit status and callers
 * can branch without parsing messages.
 *
 * - `invalid-option`: an argument or option is outside its documented range (CLI exit 2).
 * - `bad-image`: an image file is missing, unreadable, corrupt or too large.
 * - `bad-model`: a model file is malformed or fails validation.
 * - `bad-annotation`: an annotation or truth file is malformed.
 * - `bad-data`: a data folder cannot serve the job (too few items, unreadable folder).
 * - `interrupted`: the user stopped a long run (SIGINT/SIGTERM) after its state was saved.
 */
export type RectboostErrorCode =
  | 'invalid-option'
  | 'bad-image'
  | 'bad-model'
  | 'bad-annotation'
  | 'bad-data'
  | 'interrupted';

export class RectboostError extends Error {
  readonly code: RectboostErrorCode;

  constructor(code: RectboostErrorCode, message: string, options?: { cause?: unknown }) {
    super(message, options?.cause === undefined ? undefined : { cause: options.cause });
    this.name = 'RectboostError';
    this.code = code;
  }
}

/** True when `value` is a RectboostError, optionally of one code. */
export function isRectboostError(value: unknown, code?: RectboostErrorCode): value is RectboostError {
  return value instanceof RectboostError && (code === undefined || value.code === code);
}
