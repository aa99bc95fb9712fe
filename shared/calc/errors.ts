/**
 * The one error type of the estimation core. Every bad input ends here, with a stable
 * snake_case `code` (for the API and the UI to branch on), a plain-words `message`
 * (safe to show to a sampler or clerk) and, where it helps, the offending `field`.
 * It never leaks a TypeError or a NaN result to the caller.
 */
export type CalcErrorCode =
  | 'empty'
  | 'not_finite'
  | 'non_positive'
  | 'negative'
  | 'too_few_points'
  | 'too_few_distinct_x'
  | 'x_all_equal'
  | 'non_positive_y'
  | 'non_positive_x'
  | 'bad_level'
  | 'bad_model'
  | 'bad_fit'
  | 'bad_date'
  | 'dates_out_of_order'
  | 'bad_window'
  | 'bad_boundary'
  | 'boundary_too_small'
  | 'bad_option'
  | 'too_many_rows'
  | 'missing_area';

export class CalcError extends Error {
  readonly code: CalcErrorCode;
  readonly field?: string;

  constructor(code: CalcErrorCode, message: string, field?: string) {
    super(message);
    this.name = 'CalcError';
    this.code = code;
    if (field !== undefined) this.field = field;
  }

  /** Plain JSON for API responses. */
  toJSON(): { name: 'CalcError'; code: CalcErrorCode; message: string; field?: string } {
    return this.field === undefined
      ? { name: 'CalcError', code: this.code, message: this.message }
      : { name: 'CalcError', code: this.code, message: this.message, field: this.field };
  }
}

export function isCalcError(e: unknown): e is CalcError {
  return e instanceof CalcError;
}
