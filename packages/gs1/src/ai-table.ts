/**
 * The application identifiers (AIs) Evalon reads, as an explicit table.
 *
 * Why our own table and parser instead of an npm GS1 parser (checked 2026-12-04 with
 * `npm view` and by running the first candidate):
 * - `gs1-barcode-parser-mod@1.2.1` (MIT, maintained, the most used) has no type declarations,
 *   throws plain strings, reads the clock itself for the century, does not check GTIN/SSCC check
 *   digits (it accepted `]C10109521234543214`), let month 13 roll over into the next year
 *   (`17131301` came back as 2014-01-01) and accepted a 25-character lot where GS1 allows 20.
 * - `gs1js@0.0.2` is a single 0.0.x release without type declarations; the other candidates
 *   (`gs1-barcode-parser`, `gs1-barcode-parser-mod2`) publish other forks of the same code.
 * A wrong lot or expiry recorded against a loaned device is worse than a refused scan, and the
 * rules we need fit in one short table, so we keep them here with their source.
 *
 * Source: GS1 General Specifications, AI table, as published machine-readably in GS1's Barcode
 * Syntax Dictionary (gs1-syntax-dictionary.txt in GS1's Barcode Syntax Engine): format, length,
 * whether the AI has a predefined length (no FNC1 needed after it), check digit (`csum`), dates
 * (`yymmd0`: YYMMDD, day `00` allowed). Titles are GS1's data titles.
 * @packageDocumentation
 */

/** One application identifier: how its data field is written and checked. */
export interface AiDefinition {
  /** The application identifier, 2 to 4 digits. */
  readonly ai: string;
  /** GS1's data title (e.g. `BATCH/LOT`). */
  readonly title: string;
  /** What a coordinator would call the field, for messages. */
  readonly label: string;
  /** `N`: digits only; `X`: GS1 AI encodable character set 82. */
  readonly charset: 'N' | 'X';
  /** The fixed length, or the maximum length of a variable-length field. */
  readonly length: number;
  /** Whether the field always has exactly `length` characters. */
  readonly fixed: boolean;
  /**
   * Whether the AI is in GS1's table of predefined lengths, so no FNC1 separator follows it
   * (GS1 General Specifications, "element strings with predefined length").
   */
  readonly predefinedLength: boolean;
  /** Whether the last digit is a GS1 mod-10 check digit (GS1 General Specifications §7.9.1). */
  readonly checkDigit: boolean;
  /** Whether the field is a YYMMDD date in which day `00` means the last day of the month. */
  readonly date: boolean;
}

type Row = [ai: string, title: string, label: string, spec: string, flags?: string];

// [AI, GS1 data title, label for messages, format, flags]. Format as in the GS1 table: N18 is
// 18 digits, X..20 up to 20 characters of CSET 82. Flags: * predefined length, c check digit,
// d date (yymmd0).
const ROWS: readonly Row[] = [
  ['00', 'SSCC', 'SSCC (shipping container code)', 'N18', '*c'],
  ['01', 'GTIN', 'GTIN', 'N14', '*c'],
  ['02', 'CONTENT', 'GTIN of the contained items', 'N14', '*c'],
  ['10', 'BATCH/LOT', 'lot', 'X..20'],
  ['11', 'PROD DATE', 'production date', 'N6', '*d'],
  ['13', 'PACK DATE', 'packaging date', 'N6', '*d'],
  ['15', 'BEST BEFORE or BEST BY', 'best-before date', 'N6', '*d'],
  ['16', 'SELL BY', 'sell-by date', 'N6', '*d'],
  ['17', 'USE BY or EXPIRY', 'expiry date', 'N6', '*d'],
  ['20', 'VARIANT', 'product variant', 'N2', '*'],
  ['21', 'SERIAL', 'serial number', 'X..20'],
  ['22', 'CPV', 'consumer product variant', 'X..20'],
  ['30', 'VAR. COUNT', 'variable count', 'N..8'],
  ['37', 'COUNT', 'count of items', 'N..8'],
  ['240', 'ADDITIONAL ID', 'additional product identification', 'X..30'],
  ['241', 'CUST. PART No.', 'customer part number', 'X..30'],
  ['250', 'SECONDARY SERIAL', 'secondary serial number', 'X..30'],
  ['251', 'REF. TO SOURCE', 'reference to source entity', 'X..30'],
];

function toDefinition([ai, title, label, spec, flags = '']: Row): AiDefinition {
  const match = /^([NX])(\.\.)?(\d+)$/.exec(spec);
  if (!match) throw new Error(`Bad AI format ${spec} for ${ai}`);
  return {
    ai,
    title,
    label,
    charset: match[1] as 'N' | 'X',
    length: Number(match[3]),
    fixed: match[2] === undefined,
    predefinedLength: flags.includes('*'),
    checkDigit: flags.includes('c'),
    date: flags.includes('d'),
  };
}

/** Every AI Evalon reads, by AI. */
export const AI_TABLE: ReadonlyMap<string, AiDefinition> = new Map(
  ROWS.map((row) => [row[0], toDefinition(row)]),
);

/**
 * The AI that starts at `index` of `text`, trying 2, 3 and 4 digits. GS1 assigns AIs so that
 * no AI is the start of another (General Specifications, AI table), so at most one matches.
 */
export function aiAt(text: string, index: number): AiDefinition | undefined {
  for (let length = 2; length <= 4; length++) {
    const found = AI_TABLE.get(text.slice(index, index + length));
    if (found) return found;
  }
  return undefined;
}

/**
 * GS1 AI encodable character set 82 (GS1 General Specifications, "GS1 AI encodable character
 * set 82"; the same list as GS1's `cset82` linter): `!"%&'()*+,-./0-9:;<=>?A-Z_a-z`.
 */
export const CSET_82 = /^[!"%&'()*+,\-./0-9:;<=>?A-Z_a-z]*$/;
