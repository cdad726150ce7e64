import {
  GS,
  type ParsedElementString,
  buildElementString,
  parseElementString,
} from './element-string';
import { Gs1ParseError, type Gs1ErrorCode } from './errors';

// "Now" for the century of two-digit years: in 2026 the GS1 window is 1977–2076.
const NOW = new Date('2026-12-04T12:00:00Z');
const parse = (raw: string, now = NOW) => parseElementString(raw, { now });

/** The error `parse(raw)` throws; fails the test when it throws something else or nothing. */
function errorOf(raw: string, now = NOW): Gs1ParseError {
  try {
    parse(raw, now);
  } catch (error) {
    expect(error).toBeInstanceOf(Gs1ParseError);
    return error as Gs1ParseError;
  }
  throw new Error(`Expected "${raw}" to be refused`);
}

function fieldsOf(parsed: ParsedElementString) {
  const { elements: _elements, symbology: _symbology, form: _form, ...fields } = parsed;
  return fields;
}

describe('the worked element string (barcode writer’s wiki example, docs/references.md)', () => {
  // (01)09521234543213(17)100101(10)123ABC(21)1234567890 → GTIN 09521234543213, expiry
  // 2010-01-01, lot 123ABC, serial 1234567890. A scanner sends it as
  // 01095212345432131710010110123ABC<GS>211234567890.
  const expected = {
    gtin: '09521234543213',
    expiry: '2010-01-01',
    lot: '123ABC',
    serial: '1234567890',
  };
  const rawForm = `01095212345432131710010110123ABC${GS}211234567890`;

  it.each([
    ['raw with GS', rawForm, null, 'raw'],
    ['GS1 DataMatrix ]d2', `]d2${rawForm}`, 'gs1-datamatrix', 'raw'],
    ['GS1-128 ]C1', `]C1${rawForm}`, 'gs1-128', 'raw'],
    ['GS1 QR ]Q3', `]Q3${rawForm}`, 'gs1-qr', 'raw'],
    [
      'GS1 DataBar ]e0 (GS1 Barcode Syntax Engine, scandata.c)',
      `]e0${rawForm}`,
      'gs1-databar',
      'raw',
    ],
    ['human-readable', '(01)09521234543213(17)100101(10)123ABC(21)1234567890', null, 'hri'],
    [
      'human-readable behind ]C1',
      ']C1(01)09521234543213(17)100101(10)123ABC(21)1234567890',
      'gs1-128',
      'hri',
    ],
    [
      'printed with spaces',
      '(01) 09521234543213 (17) 100101 (10) 123ABC (21) 1234567890',
      null,
      'hri',
    ],
    ['with a leading FNC1 and an Enter suffix', `${GS}${rawForm}${GS}\r\n`, null, 'raw'],
  ])('reads the %s form', (_name, scanned, symbology, form) => {
    const parsed = parse(scanned);
    expect(fieldsOf(parsed)).toEqual(expected);
    expect(parsed.symbology).toBe(symbology);
    expect(parsed.form).toBe(form);
    expect(parsed.elements).toEqual([
      { ai: '01', value: '09521234543213', title: 'GTIN' },
      { ai: '17', value: '100101', title: 'USE BY or EXPIRY', date: '2010-01-01' },
      { ai: '10', value: '123ABC', title: 'BATCH/LOT' },
      { ai: '21', value: '1234567890', title: 'SERIAL' },
    ]);
  });

  it('is written back in both forms exactly as published', () => {
    expect(buildElementString(expected)).toBe(rawForm);
    expect(buildElementString(expected, { form: 'hri' })).toBe(
      '(01)09521234543213(17)100101(10)123ABC(21)1234567890',
    );
  });
});

describe('another published UDI example (docs/references.md)', () => {
  const hri = '(01)51022222233336(11)141231(17)150707(10)A213B1(21)1234';

  it('reads GTIN, production date, expiry, lot and serial', () => {
    // Dates derived: 141231 → 2014-12-31, 150707 → 2015-07-07 (both inside 1977–2076).
    const expected = {
      gtin: '51022222233336',
      productionDate: '2014-12-31',
      expiry: '2015-07-07',
      lot: 'A213B1',
      serial: '1234',
    };
    expect(fieldsOf(parse(hri))).toEqual(expected);
    const raw = `0151022222233336111412311715070710A213B1${GS}211234`;
    expect(buildElementString(expected)).toBe(raw);
    expect(fieldsOf(parse(`]d2${raw}`))).toEqual(expected);
  });
});

describe('day 00 means the last day of the month (GS1 General Specifications, date AIs)', () => {
  it.each([
    // docs/references.md: 17 280200 → 2028-02-29 (derived; 2028 is a leap year).
    ['17280200', 'expiry', '2028-02-29'],
    // docs/references.md: 210300 → 2021-03-31.
    ['11210300', 'productionDate', '2021-03-31'],
    // Derived: 2027 is no leap year; 2000 is one (divisible by 400); December has 31 days.
    ['17270200', 'expiry', '2027-02-28'],
    ['17000200', 'expiry', '2000-02-29'],
    ['11261200', 'productionDate', '2026-12-31'],
  ])('%s → %s %s', (scanned, field, date) => {
    const parsed = parse(`0109521234543213${scanned}`);
    expect(parsed[field as 'expiry' | 'productionDate']).toBe(date);
    // The element keeps what was encoded; only `date` resolves the day.
    expect(parsed.elements[1]).toMatchObject({ value: scanned.slice(2), date });
  });
});

describe('calendar checks (unit tests of GS1’s `yymmd0` linter, GS1 Barcode Syntax Engine)', () => {
  // The linter's tests run with CURRENT_YEAR 21, so these years are 20YY there as here.
  it.each(['200229', '240229', '200131', '200430', '200600', '000606'])('accepts %s', (yymmdd) => {
    expect(parse(`17${yymmdd}`).expiry).toMatch(/^\d{4}-\d{2}-\d{2}$/);
  });

  it.each(['200230', '210229', '220229', '200431', '200132', '201310', '200010', '209910'])(
    'refuses %s',
    (yymmdd) => {
      expect(errorOf(`17${yymmdd}`).code).toBe('bad_date');
    },
  );
});

describe('century of two-digit years (GS1 General Specifications §7.12)', () => {
  // Thresholds as in GS1's Barcode Syntax Engine (lint_yymmd0.c): YY − current ≥ 51 → previous
  // century, ≤ −50 → next century. The years below are derived from that rule.
  it.each([
    ['2026-12-04', '760101', '2076-01-01'],
    ['2026-12-04', '770101', '1977-01-01'],
    ['2021-06-01', '710101', '2071-01-01'],
    ['2021-06-01', '720101', '1972-01-01'],
    ['2060-06-01', '100101', '2110-01-01'],
    ['2060-06-01', '110101', '2011-01-01'],
    ['2099-12-31', '000101', '2100-01-01'],
  ])('in %s, %s is %s', (now, yymmdd, date) => {
    expect(parse(`17${yymmdd}`, new Date(`${now}T00:00:00Z`)).expiry).toBe(date);
  });

  it('takes the year of "now" in UTC', () => {
    // 2027-01-01 00:30 in Berlin is still 2026 in UTC, so the window is 1977–2076.
    expect(parse('17770101', new Date('2026-12-31T23:30:00Z')).expiry).toBe('1977-01-01');
    expect(parse('17770101', new Date('2027-01-01T00:30:00Z')).expiry).toBe('2077-01-01');
  });
});

describe('other application identifiers and forms', () => {
  it('reads an SSCC with the count and GTIN of its contents', () => {
    const parsed = parse(`]C100106141411234567897020952123454321337120${GS}3015`);
    expect(fieldsOf(parsed)).toEqual({
      sscc: '106141411234567897',
      content: '09521234543213',
      count: 120,
      quantity: 15,
    });
    expect(parsed.elements.map((e) => e.title)).toEqual(['SSCC', 'CONTENT', 'COUNT', 'VAR. COUNT']);
  });

  it('reads the further AIs of the table into elements', () => {
    // Formats from GS1's Barcode Syntax Dictionary: 13/15/16 N6 dates, 20 N2, 22 X..20,
    // 240/241/250/251 X..30.
    const parsed = parse(
      '(01)09521234543213(13)260101(15)270100(16)261130(20)07(22)CPV-1' +
        '(240)ADD/ID.1(241)PART+7(250)SEC-SERIAL_9(251)SRC:42',
    );
    expect(parsed.elements.map(({ ai, value }) => `${ai}=${value}`)).toEqual([
      '01=09521234543213',
      '13=260101',
      '15=270100',
      '16=261130',
      '20=07',
      '22=CPV-1',
      '240=ADD/ID.1',
      '241=PART+7',
      '250=SEC-SERIAL_9',
      '251=SRC:42',
    ]);
    expect(parsed.elements[2]?.date).toBe('2027-01-31');
  });

  it('lets a lot hold parentheses and every CSET 82 punctuation mark in the raw form', () => {
    // GS1 AI encodable character set 82 (GS1's cset82 linter tests pass these characters).
    const lot = `!"%&'()*+,-./:;<=>?_`;
    expect(parse(`10${lot}${GS}21x`).lot).toBe(lot);
  });

  it('accepts the same AI twice with the same value', () => {
    expect(parse('(10)A1(10)A1').lot).toBe('A1');
  });

  it('ignores an FNC1 after a predefined-length field', () => {
    expect(parse(`0109521234543213${GS}17280200${GS}10L1`).lot).toBe('L1');
  });
});

describe('errors: a code for programs and a message for the coordinator', () => {
  const cases: [Gs1ErrorCode, string, RegExp][] = [
    ['empty', '', /Nothing was scanned/],
    ['empty', ' \r\n', /Nothing was scanned/],
    ['empty', ']d2', /no data/],
    ['empty', `10${GS}21ABC`, /lot \(AI 10\) has no value/],
    ['empty', '(01)09521234543213(10)', /lot \(AI 10\) has no value/],
    ['unsupported_symbology', ']E04006381333931', /does not carry GS1 data.*\]E0/],
    ['unsupported_symbology', ']d1HELLO', /does not carry GS1 data/],
    ['unsupported_symbology', ']', /does not carry GS1 data/],
    ['unknown_ai', '9912345', /field Evalon does not read \(it starts “9912”/],
    ['unknown_ai', '(01)09521234543213(7003)2801011200', /does not read \(it starts “\(7003\)”/],
    ['unknown_ai', 'hello world', /does not look like GS1 barcode data/],
    ['unknown_ai', '(ABC)', /does not look like GS1 barcode data/],
    [
      'truncated',
      '010952123454321',
      /GTIN \(AI 01\) is cut short: it needs 14 digits, 13 were read/,
    ],
    ['truncated', `0109521${GS}10ABC`, /cut short/],
    ['truncated', '(17)2802', /expiry date \(AI 17\) is cut short/],
    ['too_long', `10${'A'.repeat(21)}`, /21 characters where GS1 allows at most 20.*separator/],
    ['too_long', '(01)095212345432130', /exactly 14/],
    ['too_long', '30123456789', /variable count \(AI 30\) has 9 characters/],
    ['bad_character', '(01)0952123454321A', /digits only/],
    ['bad_character', '10AB@C', /contains “@”/],
    ['bad_character', '(10)AB CD', /contains a space/],
    ['bad_character', `(10)AB${GS}CD`, /field separator/],
    [
      'check_digit',
      '0109521234543214',
      /GTIN \(AI 01\) 09521234543214 fails its check digit \(the last digit should be 3\)/,
    ],
    ['check_digit', '(00)106141411234567890', /SSCC.*should be 7/],
    ['check_digit', '0209521234543210', /contained items/],
    ['bad_date', '17281301', /there is no month 13/],
    ['bad_date', '17280230', /2028-02 has no day 30/],
    ['bad_date', '11210229', /2021-02 has no day 29/],
    ['duplicate_ai', '(10)A1(10)B2', /two different values for the lot \(AI 10\): “A1” and “B2”/],
  ];

  it.each(cases)('%s: %j', (code, scanned, message) => {
    const error = errorOf(scanned);
    expect(error.code).toBe(code);
    expect(error.name).toBe('Gs1ParseError');
    expect(error.message).toMatch(message);
  });

  it('covers every error code', () => {
    const codes = new Set(cases.map(([code]) => code));
    const all: Record<Gs1ErrorCode, true> = {
      empty: true,
      unsupported_symbology: true,
      unknown_ai: true,
      truncated: true,
      too_long: true,
      bad_character: true,
      check_digit: true,
      bad_date: true,
      duplicate_ai: true,
    };
    expect([...codes].sort()).toEqual(Object.keys(all).sort());
  });

  it('says which AI and where, counting from the start of what was scanned', () => {
    const plain = errorOf('0109521234543214');
    expect([plain.ai, plain.position]).toEqual(['01', 0]);
    const prefixed = errorOf(`  ]d2010952123454321317281301`);
    expect([prefixed.code, prefixed.ai, prefixed.position]).toEqual(['bad_date', '17', 21]);
    const hri = errorOf('(01)09521234543213(10)A(10)B');
    expect([hri.ai, hri.position]).toEqual(['10', 23]);
  });

  it('shows control characters readably', () => {
    expect(errorOf(']d\u0004').message).toContain('⟨U+0004⟩');
  });
});

describe('buildElementString', () => {
  it('pads shorter GTINs to 14 digits (AI 01 always carries 14)', () => {
    // The widely printed EAN-13 example (docs/references.md) as GTIN-14.
    expect(buildElementString({ gtin: '4006381333931' }, { form: 'hri' })).toBe(
      '(01)04006381333931',
    );
  });

  it('puts a GS after variable-length fields only, and none at the end', () => {
    expect(buildElementString({ lot: 'L1', serial: 'S1', quantity: 3 })).toBe(
      `303${GS}10L1${GS}21S1`,
    );
  });

  it.each([
    [{}, /Nothing to encode/],
    [{ gtin: '09521234543214' }, /not a valid GTIN/],
    [{ sscc: '10614141123456789' }, /not a valid SSCC-18/],
    [{ expiry: '2028-02-30' }, /not a calendar date/],
    [{ expiry: '28-02-01' }, /YYYY-MM-DD/],
    [{ lot: '' }, /1 to 20 characters/],
    [{ lot: 'A'.repeat(21) }, /1 to 20 characters/],
    [{ serial: 'AB CD' }, /character set 82/],
    [{ count: -1 }, /whole number/],
    [{ quantity: 1.5 }, /whole number/],
    [{ count: 100_000_000 }, /whole number/],
  ])('refuses %j', (fields, message) => {
    expect(() => buildElementString(fields)).toThrow(message);
  });

  it('refuses a date the reader would put in another century, when told "now"', () => {
    expect(() => buildElementString({ expiry: '2080-01-01' }, { now: NOW })).toThrow(/century/);
    expect(buildElementString({ expiry: '2076-01-01' }, { now: NOW })).toBe('17760101');
  });

  it('refuses a bracketed number inside a value in the bracketed form only', () => {
    expect(() => buildElementString({ lot: 'A(21)B' }, { form: 'hri' })).toThrow(/raw form/);
    expect(parse(buildElementString({ lot: 'A(21)B', serial: 'S' })).lot).toBe('A(21)B');
  });
});
