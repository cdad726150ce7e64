/**
 * GS1 element strings: reading what a scanner sends, and writing them for labels and tests.
 * @packageDocumentation
 */
import { AI_TABLE, CSET_82, type AiDefinition, aiAt } from './ai-table';
import { gs1CheckDigit, isValidGs1Key } from './check-digit';
import { type IsoDate, readGs1Date, resolveGs1Year, toGs1Date } from './dates';
import { Gs1ParseError } from './errors';

/** ASCII 29, group separator: how a scanner transmits FNC1 between fields. */
export const GS = '\u001d';

/** The GS1 barcode a symbology identifier names. */
export type Gs1Symbology = 'gs1-128' | 'gs1-datamatrix' | 'gs1-qr' | 'gs1-databar';

/**
 * Symbology identifiers (ISO/IEC 15424) a scanner may put in front of GS1 data. `]C1`, `]d2`
 * and `]Q3` are those of docs/references.md; `]e0` (GS1 DataBar and GS1 composite) is taken
 * from the table of GS1's Barcode Syntax Engine (scandata.c), which reads the same four as GS1
 * data. Anything else after `]` is not GS1 data, e.g. `]E0` (EAN-13) or `]d1` (plain Data Matrix).
 */
export const SYMBOLOGY_IDENTIFIERS: Readonly<Record<string, Gs1Symbology>> = {
  ']C1': 'gs1-128',
  ']d2': 'gs1-datamatrix',
  ']Q3': 'gs1-qr',
  ']e0': 'gs1-databar',
};

/** One field of an element string. */
export interface Gs1Element {
  /** The application identifier, e.g. `17`. */
  readonly ai: string;
  /** The data as encoded, e.g. `280200`. */
  readonly value: string;
  /** GS1's data title, e.g. `USE BY or EXPIRY`. */
  readonly title: string;
  /** For date AIs: the calendar date it stands for (day `00` → last day of the month). */
  readonly date?: IsoDate;
}

/** The fields Evalon uses, by name. Also the input of {@link buildElementString}. */
export interface Gs1Fields {
  /** AI 00: the 18-digit SSCC of a logistic unit (shipping container). */
  readonly sscc?: string;
  /** AI 01: the 14-digit GTIN, the UDI device identifier. */
  readonly gtin?: string;
  /** AI 02: the GTIN of the items contained in a logistic unit. */
  readonly content?: string;
  /** AI 11: production date. */
  readonly productionDate?: IsoDate;
  /** AI 17: expiry ("use by") date. */
  readonly expiry?: IsoDate;
  /** AI 10: batch or lot. */
  readonly lot?: string;
  /** AI 21: serial number. */
  readonly serial?: string;
  /** AI 30: variable count of items. */
  readonly quantity?: number;
  /** AI 37: count of trade items in a logistic unit (goes with AI 02). */
  readonly count?: number;
}

/** What {@link parseElementString} read. */
export interface ParsedElementString extends Gs1Fields {
  /** Every field in the order scanned. */
  readonly elements: readonly Gs1Element[];
  /** The barcode the scanner named with a symbology identifier, or null when it sent none. */
  readonly symbology: Gs1Symbology | null;
  /** `raw`: FNC1/GS separated as scanners send it; `hri`: with AIs in parentheses. */
  readonly form: 'raw' | 'hri';
}

/** Options of {@link parseElementString}. */
export interface ParseOptions {
  /**
   * The instant that counts as "now" for the century of two-digit years (GS1 General
   * Specifications §7.12). Pass the server's clock; the default reads the system clock, the only
   * clock read in this package, so pass it wherever results must be repeatable.
   */
  readonly now?: Date;
}

/**
 * Reads a GS1 element string in any form a scanner or a person sends it:
 * - raw, with FNC1 sent as GS (ASCII 29) after variable-length fields:
 *   `01095212345432131710010110123ABC<GS>211234567890` (a leading or trailing GS is ignored);
 * - the same behind a symbology identifier: `]d2…` (GS1 DataMatrix), `]C1…` (GS1-128),
 *   `]Q3…` (GS1 QR Code), `]e0…` (GS1 DataBar);
 * - the human-readable form with AIs in parentheses: `(01)09521234543213(17)100101(10)123ABC`.
 * Surrounding white space (a scanner's Enter suffix) is ignored.
 *
 * Checked: AIs against the table (00, 01, 02, 10, 11, 13, 15, 16, 17, 20, 21, 22, 30, 37, 240,
 * 241, 250, 251), lengths, digits and GS1 character set 82, GTIN/SSCC check digits, real
 * calendar dates (day `00` = last day of the month), one value per AI. It checks syntax only:
 * whether the item belongs on the packing list is the caller's question.
 *
 * @throws Gs1ParseError for anything wrong with the scanned text, with a code and a message a
 *   coordinator can act on (and nothing else for any string); RangeError only for an invalid
 *   `options.now`.
 */
export function parseElementString(raw: string, options: ParseOptions = {}): ParsedElementString {
  if (typeof raw !== 'string') throw new Gs1ParseError('empty', MESSAGES.nothingScanned);
  const now = options.now ?? new Date();
  if (Number.isNaN(now.getTime())) throw new RangeError('options.now is not a valid date');

  const start = raw.length - raw.trimStart().length;
  let text = raw.trim();
  let offset = start;
  if (text === '') throw new Gs1ParseError('empty', MESSAGES.nothingScanned);

  let symbology: Gs1Symbology | null = null;
  if (text.startsWith(']')) {
    const identifier = text.slice(0, 3);
    const known = SYMBOLOGY_IDENTIFIERS[identifier];
    if (!known) {
      throw new Gs1ParseError(
        'unsupported_symbology',
        'The scanner read a barcode that does not carry GS1 data ' +
          `(it reports “${printable(identifier)}”). Scan the GS1 DataMatrix or GS1-128 barcode ` +
          'on the label: the one with “(01)” printed next to it.',
        { position: offset },
      );
    }
    symbology = known;
    text = text.slice(3);
    offset += 3;
    const inner = text.length - text.trimStart().length;
    text = text.trimStart();
    offset += inner;
    if (text === '') throw new Gs1ParseError('empty', MESSAGES.nothingAfterIdentifier);
  }

  const form = text.startsWith('(') ? 'hri' : 'raw';
  const elements = form === 'hri' ? readHri(text, offset, now) : readRaw(text, offset, now);
  return { ...fieldsOf(elements), elements, symbology, form };
}

interface Located {
  readonly definition: AiDefinition;
  readonly value: string;
  /** Index of the AI in the caller's string. */
  readonly position: number;
}

/** Raw form: fixed-length fields end by their length, variable ones at GS or the end. */
function readRaw(text: string, offset: number, now: Date): Gs1Element[] {
  const found: Located[] = [];
  let index = 0;
  while (index < text.length) {
    if (text[index] === GS) {
      // FNC1 after a predefined-length field, or a leading/trailing FNC1: allowed, skipped.
      index++;
      continue;
    }
    const position = offset + index;
    const definition = aiAt(text, index);
    if (!definition) throw unknownAi(text.slice(index, index + 4), position, found.length === 0);
    index += definition.ai.length;
    let value: string;
    if (definition.fixed) {
      value = text.slice(index, index + definition.length);
      const separator = value.indexOf(GS);
      if (separator >= 0) value = value.slice(0, separator);
      index += value.length;
    } else {
      const end = text.indexOf(GS, index);
      value = text.slice(index, end < 0 ? text.length : end);
      index += value.length;
    }
    found.push({ definition, value, position });
  }
  return checkAll(found, now);
}

// An AI in parentheses, as printed under a barcode.
const BRACKETED_AI = /\((\d{2,4})\)/g;

/**
 * Human-readable form. Every bracketed group of 2 to 4 digits starts a new field, so an unknown
 * AI in the middle is refused instead of being swallowed by the field before it. A value that
 * itself contains such a group (legal in GS1 character set 82) cannot be written in this form;
 * {@link buildElementString} refuses to produce one.
 */
function readHri(text: string, offset: number, now: Date): Gs1Element[] {
  const markers = [...text.matchAll(BRACKETED_AI)];
  if (markers.length === 0 || markers[0]!.index !== 0) {
    const shown = /^\((\d{1,4})\)/.exec(text)?.[1] ?? text.slice(0, 6);
    throw unknownAi(shown, offset, true);
  }
  const found: Located[] = markers.map((marker, i) => {
    const definition = AI_TABLE.get(marker[1]!);
    if (!definition) throw unknownAi(marker[0], offset + marker.index, false);
    const next = markers[i + 1]?.index ?? text.length;
    return {
      definition,
      // Printed labels often have a space between the "(AI)" and its data; CSET 82 has none.
      value: text.slice(marker.index + marker[0].length, next).trim(),
      position: offset + marker.index,
    };
  });
  return checkAll(found, now);
}

function checkAll(found: readonly Located[], now: Date): Gs1Element[] {
  const elements = found.map((item) => checkElement(item, now));
  const seen = new Map<string, string>();
  for (const [i, element] of elements.entries()) {
    const earlier = seen.get(element.ai);
    if (earlier !== undefined && earlier !== element.value) {
      const { label } = found[i]!.definition;
      throw new Gs1ParseError(
        'duplicate_ai',
        `The barcode gives two different values for the ${label} (AI ${element.ai}): ` +
          `“${earlier}” and “${element.value}”. Scan one barcode at a time; if a single barcode ` +
          'does this, the label is faulty: enter the values by hand from the printed text.',
        { ai: element.ai, position: found[i]!.position },
      );
    }
    seen.set(element.ai, element.value);
  }
  return elements;
}

function checkElement({ definition, value, position }: Located, now: Date): Gs1Element {
  const { ai, label, length } = definition;
  const where = { ai, position };
  const named = `The ${label} (AI ${ai})`;
  if (value.length === 0) {
    throw new Gs1ParseError(
      'empty',
      `${named} has no value. Scan again; if it repeats, enter it by hand from the printed text.`,
      where,
    );
  }
  if (definition.fixed && value.length < length) {
    const unit = definition.charset === 'N' ? 'digits' : 'characters';
    throw new Gs1ParseError(
      'truncated',
      `${named} is cut short: it needs ${length} ${unit}, ` +
        `${value.length} were read (“${printable(value)}”). Scan the whole barcode again.`,
      where,
    );
  }
  if (value.length > length) {
    const advice = definition.fixed
      ? 'Check for a missing or extra digit.'
      : 'The scanner may not be sending the separator between fields (FNC1 as GS, ASCII 29): ' +
        'check its GS1 setting, or enter the values by hand.';
    throw new Gs1ParseError(
      'too_long',
      `${named} has ${value.length} characters where GS1 allows ` +
        `${definition.fixed ? 'exactly' : 'at most'} ${length}. ${advice}`,
      where,
    );
  }
  const bad = firstBadCharacter(value, definition.charset);
  if (bad !== null) {
    const allowed =
      definition.charset === 'N' ? 'digits only' : 'letters, digits and a few punctuation marks';
    throw new Gs1ParseError(
      'bad_character',
      `${named} may hold ${allowed}, but “${printable(value)}” contains ` +
        `${describeCharacter(bad)}. ` +
        'Scan again; if it repeats, enter the value by hand from the printed text.',
      where,
    );
  }
  if (definition.checkDigit) {
    const expected = gs1CheckDigit(value.slice(0, -1));
    if (expected !== Number(value.slice(-1))) {
      throw new Gs1ParseError(
        'check_digit',
        `${named} ${value} fails its check digit (the last digit should be ${expected}). The ` +
          'barcode was misread or the label is damaged: scan again, and if it repeats set the ' +
          'item aside and report the label.',
        where,
      );
    }
  }
  const element = { ai, value, title: definition.title };
  if (!definition.date) return element;
  const date = readGs1Date(value, now);
  if (!date.ok) {
    throw new Gs1ParseError(
      'bad_date',
      `${named} “${value}” (YYMMDD) is not a date: ${date.reason}. Scan again; if it repeats, ` +
        'read the date from the printed label.',
      where,
    );
  }
  return { ...element, date: date.date };
}

function fieldsOf(elements: readonly Gs1Element[]): Gs1Fields {
  const byAi = new Map(elements.map((e) => [e.ai, e]));
  const text = (ai: string) => byAi.get(ai)?.value;
  const number = (ai: string) => {
    const value = byAi.get(ai)?.value;
    return value === undefined ? undefined : Number(value);
  };
  const fields: Record<string, string | number | undefined> = {
    sscc: text('00'),
    gtin: text('01'),
    content: text('02'),
    productionDate: byAi.get('11')?.date,
    expiry: byAi.get('17')?.date,
    lot: text('10'),
    serial: text('21'),
    quantity: number('30'),
    count: number('37'),
  };
  // Leave absent fields out rather than undefined, so results compare and serialise cleanly.
  return Object.fromEntries(Object.entries(fields).filter(([, v]) => v !== undefined));
}

function firstBadCharacter(value: string, charset: 'N' | 'X'): string | null {
  const pattern = charset === 'N' ? /^\d$/ : CSET_82;
  for (const character of value) if (!pattern.test(character)) return character;
  return null;
}

function unknownAi(shown: string, position: number, atStart: boolean): Gs1ParseError {
  const what = printable(shown);
  const message =
    atStart && !/^\(?\d{2}/.test(shown)
      ? `This does not look like GS1 barcode data (it starts “${what}”). Scan the GS1 DataMatrix ` +
        'or GS1-128 barcode on the label: the one with “(01)” printed next to it.'
      : `The barcode holds a field Evalon does not read (it starts “${what}” at character ` +
        `${position + 1}). Enter the GTIN, lot, serial and expiry by hand from the printed text.`;
  return new Gs1ParseError('unknown_ai', message, { position });
}

const MESSAGES = {
  nothingScanned:
    'Nothing was scanned. Put the cursor in the scan field and scan the barcode again.',
  nothingAfterIdentifier:
    'The scanner sent a barcode type but no data. Scan the barcode again, holding it steady.',
};

/** A string safe to show: control characters become ⟨GS⟩ or ⟨U+XXXX⟩. */
function printable(text: string): string {
  return [...text]
    .map((c) => {
      const code = c.charCodeAt(0);
      if (code >= 0x20 && code !== 0x7f) return c;
      return c === GS ? '⟨GS⟩' : `⟨U+${code.toString(16).toUpperCase().padStart(4, '0')}⟩`;
    })
    .join('');
}

function describeCharacter(character: string): string {
  if (character === GS) return 'a field separator (GS) in the middle';
  if (character === ' ') return 'a space';
  return `“${printable(character)}”`;
}

// ---------------------------------------------------------------------------------------------
// Writing
// ---------------------------------------------------------------------------------------------

/** Options of {@link buildElementString}. */
export interface BuildOptions {
  /** `raw` (default): GS after variable-length fields, as scanners send it; `hri`: `(01)…`. */
  readonly form?: 'raw' | 'hri';
  /**
   * When given, dates whose two-digit year would be read back in another century at this
   * instant (GS1 General Specifications §7.12) are refused.
   */
  readonly now?: Date;
}

// Predefined-length fields first, variable-length ones last, so a raw string needs the fewest
// separators (common practice; the published UDI examples follow it: (01)(11)(17)(10)(21)).
const BUILD_ORDER: readonly [keyof Gs1Fields, string][] = [
  ['sscc', '00'],
  ['gtin', '01'],
  ['content', '02'],
  ['productionDate', '11'],
  ['expiry', '17'],
  ['count', '37'],
  ['quantity', '30'],
  ['lot', '10'],
  ['serial', '21'],
];

/**
 * Writes an element string from named fields, for labels and tests. A GTIN-8, -12 or -13 is
 * padded to 14 digits (AI 01 always carries 14; padding keeps the check digit).
 * @throws RangeError when a field is not valid GS1 data (check digit, length, characters, date),
 *   or when nothing is given.
 */
export function buildElementString(fields: Gs1Fields, options: BuildOptions = {}): string {
  const form = options.form ?? 'raw';
  const parts: { ai: string; value: string }[] = [];
  for (const [name, ai] of BUILD_ORDER) {
    const given = fields[name];
    if (given === undefined) continue;
    parts.push({ ai, value: encodeField(name, ai, given, options.now) });
  }
  if (parts.length === 0) throw new RangeError('Nothing to encode: give at least one field.');
  if (form === 'hri') {
    for (const { ai, value } of parts) {
      if (/\(\d{2,4}\)/.test(value)) {
        throw new RangeError(
          `AI ${ai} value "${value}" contains a bracketed number, which the bracketed form ` +
            'cannot tell apart from an AI; use the raw form.',
        );
      }
    }
    return parts.map(({ ai, value }) => `(${ai})${value}`).join('');
  }
  return parts
    .map(({ ai, value }, i) => {
      const last = i === parts.length - 1;
      const separator = AI_TABLE.get(ai)!.predefinedLength || last ? '' : GS;
      return `${ai}${value}${separator}`;
    })
    .join('');
}

function encodeField(name: string, ai: string, given: unknown, now: Date | undefined): string {
  const definition = AI_TABLE.get(ai)!;
  switch (ai) {
    case '00':
    case '01':
    case '02': {
      const digits = String(given);
      const padded =
        ai !== '00' && [8, 12, 13].includes(digits.length) ? digits.padStart(14, '0') : digits;
      if (padded.length !== definition.length || !isValidGs1Key(padded)) {
        throw new RangeError(
          `${name} "${digits}" is not a valid ${ai === '00' ? 'SSCC-18' : 'GTIN'} ` +
            '(length or check digit).',
        );
      }
      return padded;
    }
    case '11':
    case '17': {
      const yymmdd = toGs1Date(String(given));
      if (now) {
        const year = Number(String(given).slice(0, 4));
        if (resolveGs1Year(Number(yymmdd.slice(0, 2)), now) !== year) {
          throw new RangeError(
            `${name} ${String(given)} would be read back in another century ` +
              '(GS1 General Specifications §7.12).',
          );
        }
      }
      return yymmdd;
    }
    case '30':
    case '37': {
      if (
        typeof given !== 'number' ||
        !Number.isInteger(given) ||
        given < 0 ||
        given > 99_999_999
      ) {
        throw new RangeError(`${name} must be a whole number from 0 to 99,999,999 (N..8).`);
      }
      return String(given);
    }
    default: {
      const value = String(given);
      if (value.length < 1 || value.length > definition.length || !CSET_82.test(value)) {
        throw new RangeError(
          `${name} "${value}" must be 1 to ${definition.length} characters of GS1 ` +
            'character set 82.',
        );
      }
      return value;
    }
  }
}
