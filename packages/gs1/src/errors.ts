/**
 * What went wrong with a scan, as a stable code the client can branch on (the message is for
 * people, the code is for programs).
 *
 * - `empty`: nothing was scanned, or a field came with no value.
 * - `unsupported_symbology`: the scanner says the barcode is not a GS1 one (e.g. `]E0`, `]d1`).
 * - `unknown_ai`: where an application identifier should start there is none that we read.
 * - `truncated`: a fixed-length field (GTIN, SSCC, date) has fewer characters than it needs.
 * - `too_long`: a field has more characters than GS1 allows (often a missing FNC1 separator).
 * - `bad_character`: digits expected and something else found, or a character outside the GS1
 *   character set 82.
 * - `check_digit`: the GTIN or SSCC fails its mod-10 check digit.
 * - `bad_date`: a YYMMDD field that is no calendar date (month 13, 30 February ...).
 * - `duplicate_ai`: the same application identifier twice with different values.
 */
export type Gs1ErrorCode =
  | 'empty'
  | 'unsupported_symbology'
  | 'unknown_ai'
  | 'truncated'
  | 'too_long'
  | 'bad_character'
  | 'check_digit'
  | 'bad_date'
  | 'duplicate_ai';

/** Where in the scanned text the problem is, and which field it concerns. */
export interface Gs1ErrorDetails {
  /** The application identifier of the field at fault, when there is one. */
  readonly ai?: string;
  /** Zero-based index into the string that was passed to the parser. */
  readonly position?: number;
}

/**
 * The error `parseElementString` throws for anything wrong with a scan. `message` is plain
 * English that a coordinator at the packing bench can act on; `code` is stable for programs.
 */
export class Gs1ParseError extends Error {
  override readonly name = 'Gs1ParseError';
  /** The application identifier of the field at fault, when there is one. */
  readonly ai?: string;
  /** Zero-based index into the scanned string, when the problem has a place. */
  readonly position?: number;

  constructor(
    readonly code: Gs1ErrorCode,
    message: string,
    details: Gs1ErrorDetails = {},
  ) {
    super(message);
    this.ai = details.ai;
    this.position = details.position;
  }
}
