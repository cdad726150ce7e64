import { gs1CheckDigit, gtin14, isValidGtin, modelInput, toGtin14 } from './catalog';
import { gtin14Problem, modelLimits, padGtin } from './values';

// The GS1 check-digit helper shared by the server and the web app (this package), checked
// against the published examples collected in docs/references.md.
describe('GS1 check digit (GS1 General Specifications §7.9.1)', () => {
  it('matches the published examples', () => {
    // GS1 India check-digit page: 890400021003 → 7.
    expect(gs1CheckDigit('890400021003')).toBe(7);
    // GS1 Sweden check-digit page: 730001100001 → 7.
    expect(gs1CheckDigit('730001100001')).toBe(7);
    // docs/references.md: 629104150021 → 3.
    expect(gs1CheckDigit('629104150021')).toBe(3);
    // GTIN-14 09521234543213 is valid (derived; the barcode writer's wiki UDI example).
    expect(isValidGtin('09521234543213')).toBe(true);
    // Published UDI example (01)51022222233336: a valid GTIN-14.
    expect(isValidGtin('51022222233336')).toBe(true);
  });

  it('refuses a changed digit and wrong lengths', () => {
    expect(isValidGtin('09521234543214')).toBe(false);
    expect(isValidGtin('8904000210037')).toBe(true);
    expect(isValidGtin('8904000210036')).toBe(false);
    expect(isValidGtin('123')).toBe(false);
    expect(isValidGtin('0952123454321A')).toBe(false);
    expect(() => gs1CheckDigit('12a')).toThrow(RangeError);
  });

  it('builds GTIN-14s the schema accepts', () => {
    expect(toGtin14('0952123454321')).toBe('09521234543213');
    expect(gtin14.safeParse('09521234543213').success).toBe(true);
    const wrong = gtin14.safeParse('09521234543210');
    expect(wrong.success).toBe(false);
    expect(wrong.error?.issues[0]?.message).toMatch(/check digit/);
  });
});

// The form helpers the browser imports from `@evalon/contracts/values` (no zod there).
describe('GTIN form helpers', () => {
  it('names the digit a typo breaks, and a wrong length', () => {
    // 09521234543213 is valid (derived from the §7.9.1 rule); its last digit changed to 4 is not.
    expect(gtin14Problem('09521234543213')).toBeNull();
    expect(gtin14Problem('09521234543214')).toEqual({ kind: 'check', expected: 3 });
    expect(gtin14Problem('0952123454321')).toEqual({ kind: 'length' });
    expect(gtin14Problem('0952123454321A')).toEqual({ kind: 'length' });
  });

  it('pads a valid GTIN-13, -12 or -8 to 14 digits and leaves anything else alone', () => {
    // GS1 General Specifications: leading zeros keep the check digit, as weights count from the
    // right. 8904000210037 is the GS1 India example with its check digit 7.
    expect(padGtin('8904000210037')).toBe('08904000210037');
    expect(padGtin(' 8904 0002 10037 ')).toBe('08904000210037');
    // GS1 Sweden example 730001100001 with its check digit 7, as a GTIN-13.
    expect(gtin14Problem(padGtin('7300011000017'))).toBeNull();
    expect(padGtin('8904000210038')).toBe('8904000210038');
    expect(padGtin('12345')).toBe('12345');
  });

  it('agrees with the gtin14 schema on a spread of codes', () => {
    // A deterministic spread of 13-digit bodies (a linear congruential walk), not hand-picked.
    let x = 12345;
    for (let n = 0; n < 200; n++) {
      x = (x * 1103515245 + 12345) % 2147483648;
      const body = String(x).padStart(13, '7').slice(0, 13);
      for (let last = 0; last <= 9; last++) {
        const code = `${body}${last}`;
        expect(gtin14Problem(code) === null).toBe(gtin14.safeParse(code).success);
      }
    }
  });

  it('builds the model schema from the limits the forms use', () => {
    const model = (name: string) =>
      modelInput.safeParse({
        name,
        category: 'laser',
        listValue: 100,
        currency: 'USD',
        depositRule: { percentBps: 100, min: 0, max: 100, currency: 'USD' },
      }).success;
    expect(model('x'.repeat(modelLimits.nameMax))).toBe(true);
    expect(model('x'.repeat(modelLimits.nameMax + 1))).toBe(false);
    expect(model('x'.repeat(modelLimits.nameMin - 1))).toBe(false);
  });
});
