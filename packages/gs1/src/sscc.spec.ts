import fc from 'fast-check';

import { isValidGs1Key } from './check-digit';
import { parseElementString } from './element-string';
import { buildSscc } from './sscc';

describe('buildSscc (GS1 General Specifications, AI 00)', () => {
  it('builds the derived example (00)106141411234567897', () => {
    // docs/references.md (derived): extension 1, company prefix 0614141, serial reference
    // 123456789 → body 10614141123456789 → check digit 7 (also computed in check-digit.spec.ts).
    const sscc = buildSscc({
      extensionDigit: 1,
      companyPrefix: '0614141',
      serialReference: '123456789',
    });
    expect(sscc).toBe('106141411234567897');
    expect(parseElementString(`(00)${sscc}`).sscc).toBe(sscc);
  });

  it('keeps leading zeros and accepts the extension digit as text', () => {
    expect(
      buildSscc({ extensionDigit: '0', companyPrefix: '000123', serialReference: '0000000042' }),
    ).toMatch(/^00001230000000042\d$/);
  });

  it('refuses parts that do not make 16 digits, or are not digits', () => {
    expect(() =>
      buildSscc({ extensionDigit: 1, companyPrefix: '0614141', serialReference: '12345678' }),
    ).toThrow(/16 digits together, got 15/);
    expect(() =>
      buildSscc({ extensionDigit: 10, companyPrefix: '0614141', serialReference: '123456789' }),
    ).toThrow(/one digit/);
    expect(() =>
      buildSscc({ extensionDigit: 1, companyPrefix: '061A141', serialReference: '123456789' }),
    ).toThrow(/Company Prefix/);
    expect(() =>
      buildSscc({ extensionDigit: 1, companyPrefix: '061', serialReference: '1234567890123' }),
    ).toThrow(/Company Prefix/);
    expect(() =>
      buildSscc({ extensionDigit: 1, companyPrefix: '0614141', serialReference: '12345678 ' }),
    ).toThrow(/digits/);
  });

  it('always gives a valid 18-digit key that starts with its parts', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 9 }),
        fc
          .integer({ min: 4, max: 12 })
          .chain((n) =>
            fc.tuple(
              fc.stringMatching(new RegExp(`^\\d{${n}}$`)),
              fc.stringMatching(new RegExp(`^\\d{${16 - n}}$`)),
            ),
          ),
        (extensionDigit, [companyPrefix, serialReference]) => {
          const sscc = buildSscc({ extensionDigit, companyPrefix, serialReference });
          expect(sscc).toHaveLength(18);
          expect(sscc.startsWith(`${extensionDigit}${companyPrefix}${serialReference}`)).toBe(true);
          expect(isValidGs1Key(sscc)).toBe(true);
        },
      ),
    );
  });
});
