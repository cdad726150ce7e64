import { gs1CheckDigit, gtin14, isValidGtin, toGtin14 } from './catalog';

// The GS1 check-digit helper shared by the server and the web app (this package), checked
// against the published examples collected in /work/shared/reference-values.md.
describe('GS1 check digit (GS1 General Specifications §7.9.1)', () => {
  it('matches the published examples', () => {
    // GS1 India check-digit page: 890400021003 → 7.
    expect(gs1CheckDigit('890400021003')).toBe(7);
    // GS1 Sweden check-digit page: 730001100001 → 7.
    expect(gs1CheckDigit('730001100001')).toBe(7);
    // reference-values.md: 629104150021 → 3.
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
