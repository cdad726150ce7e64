import fc from 'fast-check';

import { gs1CheckDigit } from './check-digit';
import { daysInMonth, resolveGs1Year } from './dates';
import {
  GS,
  type Gs1Fields,
  SYMBOLOGY_IDENTIFIERS,
  buildElementString,
  parseElementString,
} from './element-string';
import { Gs1ParseError } from './errors';

const NOW = new Date('2026-12-04T12:00:00Z');

// GS1 AI encodable character set 82, written out (GS1 General Specifications; GS1's cset82
// linter): the alphabet of lots and serials.
const CSET_82_CHARACTERS = [
  ...`!"%&'()*+,-./:;<=>?_`,
  ...'0123456789',
  ...'ABCDEFGHIJKLMNOPQRSTUVWXYZ',
  ...'abcdefghijklmnopqrstuvwxyz',
];

const keyArb = (bodyLength: number) =>
  fc
    .stringMatching(new RegExp(`^\\d{${bodyLength}}$`))
    .map((body) => `${body}${gs1CheckDigit(body)}`);

// A date that the reader puts back in the same century: inside 1977–2076 when "now" is 2026.
const dateArb = fc
  .record({
    year: fc.integer({ min: 1977, max: 2076 }),
    month: fc.integer({ min: 1, max: 12 }),
    day: fc.integer({ min: 1, max: 31 }),
  })
  .map(({ year, month, day }) => {
    const d = Math.min(day, daysInMonth(year, month));
    return `${year}-${String(month).padStart(2, '0')}-${String(d).padStart(2, '0')}`;
  });

const textArb = fc.string({
  unit: fc.constantFrom(...CSET_82_CHARACTERS),
  minLength: 1,
  maxLength: 20,
});
const countArb = fc.integer({ min: 0, max: 99_999_999 });

const fieldsArb: fc.Arbitrary<Gs1Fields> = fc
  .record(
    {
      sscc: keyArb(17),
      gtin: keyArb(13),
      content: keyArb(13),
      productionDate: dateArb,
      expiry: dateArb,
      lot: textArb,
      serial: textArb,
      quantity: countArb,
      count: countArb,
    },
    { requiredKeys: [] },
  )
  .filter((fields) => Object.keys(fields).length > 0);

function fieldsOf(raw: string) {
  const {
    elements: _e,
    symbology: _s,
    form: _f,
    ...fields
  } = parseElementString(raw, { now: NOW });
  return fields;
}

describe('build → parse round trip (fast-check)', () => {
  it('gives back every field from the raw form, behind any GS1 symbology identifier', () => {
    fc.assert(
      fc.property(
        fieldsArb,
        fc.constantFrom('', ...Object.keys(SYMBOLOGY_IDENTIFIERS)),
        (fields, identifier) => {
          const raw = buildElementString(fields, { now: NOW });
          expect(fieldsOf(`${identifier}${raw}`)).toEqual(fields);
        },
      ),
      { numRuns: 500 },
    );
  });

  it('gives back every field from the bracketed form', () => {
    fc.assert(
      fc.property(
        // A bracketed number inside a lot or serial cannot be written in this form (documented).
        fieldsArb.filter((f) => ![f.lot, f.serial].some((v) => v && /\(\d{2,4}\)/.test(v))),
        (fields) => {
          const hri = buildElementString(fields, { form: 'hri', now: NOW });
          expect(fieldsOf(hri)).toEqual(fields);
        },
      ),
      { numRuns: 500 },
    );
  });
});

describe('parsing random input (fast-check)', () => {
  const isGs1ParseError = (raw: string) => {
    try {
      parseElementString(raw, { now: NOW });
    } catch (error) {
      if (!(error instanceof Gs1ParseError)) throw error;
      expect(error.message.length).toBeGreaterThan(20);
    }
  };

  it('throws nothing but Gs1ParseError on arbitrary strings', () => {
    fc.assert(fc.property(fc.string({ unit: 'binary', maxLength: 60 }), isGs1ParseError), {
      numRuns: 1000,
    });
  });

  it('throws nothing but Gs1ParseError on strings made of GS1 syntax characters', () => {
    // Digits, separators, brackets and symbology identifiers reach the deeper checks.
    const unit = fc.constantFrom(
      ...'0123456789',
      '0',
      '1',
      GS,
      '(',
      ')',
      ']',
      'd',
      '2',
      'C',
      'A',
      ' ',
    );
    fc.assert(fc.property(fc.string({ unit, maxLength: 60 }), isGs1ParseError), { numRuns: 2000 });
  });

  it('refuses a valid scan with one GTIN digit changed, naming the check digit', () => {
    fc.assert(
      fc.property(
        keyArb(13),
        fc.integer({ min: 0, max: 13 }),
        fc.integer({ min: 1, max: 9 }),
        (gtin, i, delta) => {
          const digit = (Number(gtin[i]) + delta) % 10;
          const changed = `${gtin.slice(0, i)}${digit}${gtin.slice(i + 1)}`;
          expect(() => parseElementString(`]d201${changed}10LOT1`, { now: NOW })).toThrow(
            expect.objectContaining({ code: 'check_digit', ai: '01' }),
          );
        },
      ),
    );
  });
});

describe('century window (GS1 General Specifications §7.12)', () => {
  it('puts every two-digit year within current − 49 … current + 50, same last digits', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 99 }),
        fc.date({
          min: new Date('1950-01-01T00:00:00Z'),
          max: new Date('2200-12-31T23:59:59Z'),
          noInvalidDate: true,
        }),
        (yy, now) => {
          const year = resolveGs1Year(yy, now);
          const current = now.getUTCFullYear();
          expect(year % 100).toBe(yy);
          expect(year - current).toBeGreaterThanOrEqual(-49);
          expect(year - current).toBeLessThanOrEqual(50);
        },
      ),
    );
  });
});
