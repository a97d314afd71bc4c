export type CalcErrorCode =
  | 'cutoff'
  | 'no-solution'
  | 'over-supply'
  | 'grid-conduction'
  | 'invalid-input'
  | 'unsupported';

/** A stage that cannot be analysed, with a message meant for the designer. */
export class CalcError extends Error {
  readonly code: CalcErrorCode;
  constructor(code: CalcErrorCode, message: string) {
    super(message);
    this.name = 'CalcError';
    this.code = code;
  }
}
