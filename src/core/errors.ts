/**
 * Errors a user can act on. Every failure the core reports about user input is a `SlopewiseError`
 * with a message that says what was wrong and, when it applies, where (0-based offset into the text
 * that was given). Adapters print `message` and the position; never a stack trace.
 */
export type ErrorCode =
  | 'too-long'
  | 'too-deep'
  | 'syntax'
  | 'not-allowed'
  | 'unknown-function'
  | 'no-variable'
  | 'bad-argument'
  | 'budget'
  | 'io';

export class SlopewiseError extends Error {
  readonly code: ErrorCode;
  /** 0-based offset in the input where the problem is, when known. */
  readonly position?: number;

  constructor(code: ErrorCode, message: string, position?: number) {
    super(message);
    this.name = 'SlopewiseError';
    this.code = code;
    if (position !== undefined) this.position = position;
  }

  toJSON(): { message: string; code: ErrorCode; position?: number } {
    return this.position === undefined
      ? { message: this.message, code: this.code }
      : { message: this.message, code: this.code, position: this.position };
  }
}

export function isSlopewiseError(e: unknown): e is SlopewiseError {
  return e instanceof SlopewiseError;
}
