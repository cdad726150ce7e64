/**
 * `@evalon/gs1`: GS1 barcode content for Evalon's packing checklist (no I/O; the browser and
 * the server both import it).
 *
 * - Check digits of GTINs and SSCCs (GS1 General Specifications §7.9.1): {@link gs1CheckDigit},
 *   {@link isValidGs1Key}. This is the one home of the rule.
 * - Element strings as scanners send them (FNC1 as GS, symbology identifiers `]d2`, `]C1`,
 *   `]Q3`, `]e0`) or as printed (`(01)…(17)…`): {@link parseElementString}, which throws only
 *   {@link Gs1ParseError}; and {@link buildElementString} for labels and tests.
 * - SSCCs for shipments: {@link buildSscc}.
 * - Barcode images (PNG, Node only) live in the separate entry `@evalon/gs1/render`:
 *   `renderGs1128` and `renderGs1DataMatrix`.
 *
 * Parsing checks the syntax of what was scanned. Whether the item is the one on the packing
 * list, and whether it is fit to ship, stays with the coordinator, the manufacturer's
 * instructions for use and local rules.
 * @packageDocumentation
 */

/** The GS1 mod-10 check digit and key validation. */
export { GS1_KEY_LENGTHS, gs1CheckDigit, isValidGs1Key } from './check-digit';

/** The application identifiers Evalon reads. */
export { AI_TABLE, type AiDefinition, CSET_82 } from './ai-table';

/** Six-digit GS1 dates: the century window and day 00. */
export {
  type Gs1DateResult,
  type IsoDate,
  daysInMonth,
  isLeapYear,
  readGs1Date,
  resolveGs1Year,
  toGs1Date,
} from './dates';

/** Reading and writing element strings. */
export {
  type BuildOptions,
  GS,
  type Gs1Element,
  type Gs1Fields,
  type Gs1Symbology,
  type ParseOptions,
  type ParsedElementString,
  SYMBOLOGY_IDENTIFIERS,
  buildElementString,
  parseElementString,
} from './element-string';

/** The error parsing throws. */
export { type Gs1ErrorCode, type Gs1ErrorDetails, Gs1ParseError } from './errors';

/** Shipping container codes. */
export { type SsccParts, buildSscc } from './sscc';
