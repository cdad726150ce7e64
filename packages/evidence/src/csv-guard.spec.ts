import fc from 'fast-check';
import { csvSafeCell } from './csv-guard';

describe('csvSafeCell', () => {
  // OWASP "CSV Injection": cells starting with = + - @ (and tab, CR) are read as formulas by
  // spreadsheet programs; prefixing a single quote makes them text (guidance quoted from memory).
  it.each([
    ['=HYPERLINK("http://x.example","y")', '\'=HYPERLINK("http://x.example","y")'],
    ['+1+2', "'+1+2"],
    ['-2+3', "'-2+3"],
    ['@SUM(A1:A2)', "'@SUM(A1:A2)"],
    ['\t=1', "'\t=1"],
    ['\r=1', "'\r=1"],
  ])('prefixes %j', (input, expected) => {
    expect(csvSafeCell(input)).toBe(expected);
  });

  it('leaves plain text, numbers (negative too) and empty values as they are', () => {
    expect(csvSafeCell('complete')).toBe('complete');
    expect(csvSafeCell('a=b')).toBe('a=b');
    expect(csvSafeCell(-4.5)).toBe(-4.5);
    expect(csvSafeCell(null)).toBe('');
    expect(csvSafeCell(undefined)).toBe('');
    expect(csvSafeCell(true)).toBe('yes');
  });

  it('never returns text a spreadsheet would read as a formula (property)', () => {
    fc.assert(
      fc.property(fc.string(), (s) => {
        const out = csvSafeCell(s) as string;
        expect(/^[=+\-@\t\r]/.test(out)).toBe(false);
        // Nothing is lost: the original text follows the optional quote.
        expect(out === s || out === `'${s}`).toBe(true);
      }),
    );
  });
});
