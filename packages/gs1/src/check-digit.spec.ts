import fc from 'fast-check';

import { gs1CheckDigit, isValidGs1Key } from './check-digit';

describe('GS1 check digit (GS1 General Specifications §7.9.1)', () => {
  it('matches the published check-digit examples', () => {
    // GS1 India check-digit page: 890400021003 → 7.
    expect(gs1CheckDigit('890400021003')).toBe(7);
    // GS1 Sweden check-digit page: 730001100001 → 7.
    expect(gs1CheckDigit('730001100001')).toBe(7);
    // docs/references.md (GS1 section; no publisher named there): 629104150021 → 3.
    expect(gs1CheckDigit('629104150021')).toBe(3);
  });

  it('accepts the published keys', () => {
    // Derived (docs/references.md): GTIN-14 09521234543213 of the barcode writer's wiki example.
    expect(isValidGs1Key('09521234543213')).toBe(true);
    // The widely printed EAN-13 example (docs/references.md), also as GTIN-14.
    expect(isValidGs1Key('4006381333931')).toBe(true);
    expect(isValidGs1Key('04006381333931')).toBe(true);
    // Published UDI example (01)51022222233336 (docs/references.md): a valid GTIN-14.
    expect(isValidGs1Key('51022222233336')).toBe(true);
  });

  // GS1's Barcode Syntax Engine, scandata.c, unit test of validateParity.
  it('agrees with the check-digit unit tests of GS1’s Barcode Syntax Engine', () => {
    // Good keys of each length, and the bad ones with the check digit the engine recomputes.
    expect(isValidGs1Key('24012345678905')).toBe(true);
    expect(isValidGs1Key('24012345678909')).toBe(false);
    expect(gs1CheckDigit('2401234567890')).toBe(5);
    expect(isValidGs1Key('2112233789657')).toBe(true);
    expect(gs1CheckDigit('211223378965')).toBe(7);
    expect(isValidGs1Key('416000336108')).toBe(true);
    expect(gs1CheckDigit('41600033610')).toBe(8);
    expect(isValidGs1Key('02345680')).toBe(true);
    expect(gs1CheckDigit('0234568')).toBe(0);
  });

  it('computes the derived SSCC example 10614141123456789 → 7 by hand as well', () => {
    // docs/references.md (derived): body 10614141123456789 → check digit 7. The same sum
    // written out: weights 3,1,3,… from the rightmost digit of the 17-digit body.
    const body = '10614141123456789';
    const sum = [...body]
      .reverse()
      .reduce((acc, digit, i) => acc + Number(digit) * (i % 2 === 0 ? 3 : 1), 0);
    expect(sum).toBe(143);
    expect((10 - (sum % 10)) % 10).toBe(7);
    expect(gs1CheckDigit(body)).toBe(7);
    expect(isValidGs1Key('106141411234567897')).toBe(true);
  });

  it('refuses wrong digits, lengths and characters', () => {
    expect(isValidGs1Key('09521234543214')).toBe(false);
    expect(isValidGs1Key('106141411234567890')).toBe(false);
    expect(isValidGs1Key('123')).toBe(false);
    // 17 digits is a GSIN, not a key this function covers.
    expect(isValidGs1Key('10614141123456789')).toBe(false);
    expect(isValidGs1Key('0952123454321A')).toBe(false);
    expect(isValidGs1Key(' 9521234543213')).toBe(false);
    expect(() => gs1CheckDigit('')).toThrow(RangeError);
    expect(() => gs1CheckDigit('12a')).toThrow(RangeError);
  });

  it('keeps a key valid when padded with leading zeros (weights count from the right)', () => {
    fc.assert(
      fc.property(fc.stringMatching(/^\d{7,13}$/), (body) => {
        const key = `${body}${gs1CheckDigit(body)}`;
        expect(gs1CheckDigit(body.padStart(17, '0'))).toBe(gs1CheckDigit(body));
        if ([8, 12, 13, 14].includes(key.length)) expect(isValidGs1Key(key)).toBe(true);
      }),
    );
  });

  it('detects every single-digit substitution (weights 3 and 1 are prime to 10)', () => {
    // GS1 General Specifications §7.9.1 design property, checked exhaustively on random keys.
    fc.assert(
      fc.property(
        fc.stringMatching(/^\d{13}$/),
        fc.integer({ min: 0, max: 13 }),
        fc.integer({ min: 1, max: 9 }),
        (body, position, delta) => {
          const key = `${body}${gs1CheckDigit(body)}`;
          const changed = (Number(key[position]) + delta) % 10;
          const mutated = `${key.slice(0, position)}${changed}${key.slice(position + 1)}`;
          expect(isValidGs1Key(mutated)).toBe(false);
        },
      ),
    );
  });
});
