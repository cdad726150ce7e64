import { formatMoney } from '@evalon/deposits';
import {
  amountProblem,
  amountToMinor,
  bpsToPercentText,
  depositRuleShort,
  percentToBps,
  toMajorText,
} from './money';

// Minor units follow ISO 4217 exponents, as the payment provider's documentation states:
// 1000 = 10.00 USD, 10 = 10 JPY (docs/references.md, "Money and payments").
describe('catalogue money helpers', () => {
  it('shows minor units as the major-unit text a form holds', () => {
    expect(toMajorText(1000, 'USD')).toBe('10.00');
    expect(toMajorText(10, 'JPY')).toBe('10');
    expect(toMajorText(5, 'USD')).toBe('0.05');
    expect(toMajorText(185_000_000, 'USD')).toBe('1850000.00');
  });

  it('converts typed amounts exactly, thousands commas allowed', () => {
    expect(amountToMinor('10.00', 'USD')).toBe(1000);
    expect(amountToMinor('10', 'JPY')).toBe(10);
    expect(amountToMinor('1,250.50', 'USD')).toBe(125050);
    // 0.1 + 0.2 is not 0.3 in floating point; typed text converts without that error.
    expect(amountToMinor('0.30', 'USD')).toBe(30);
    for (const minor of [0, 1, 99, 12345, 999999999]) {
      expect(amountToMinor(toMajorText(minor, 'USD'), 'USD')).toBe(minor);
    }
  });

  it('explains amounts that cannot be converted exactly', () => {
    expect(amountProblem('12.345', 'USD')).toBe('USD has 2 decimal places at most.');
    expect(amountProblem('10.5', 'JPY')).toBe('JPY has no decimal places: enter a whole amount.');
    expect(amountProblem('ten', 'USD')).toBe('Enter an amount in numbers only, e.g. 1250.00.');
    expect(amountProblem('-5', 'USD')).toBe('Enter an amount of zero or more.');
    expect(amountProblem('5', 'XYZ')).toBe('Choose the currency first.');
    expect(amountProblem('', 'USD')).toBeNull();
    expect(amountProblem('12.340', 'USD')).toBeNull();
  });

  it('turns percentages into basis points and back', () => {
    expect(percentToBps('2')).toBe(200);
    expect(percentToBps('2.5')).toBe(250);
    expect(percentToBps('12.75')).toBe(1275);
    expect(percentToBps('100')).toBe(10000);
    expect(percentToBps('2.555')).toBeNull();
    expect(percentToBps('abc')).toBeNull();
    expect(bpsToPercentText(250)).toBe('2.5');
    expect(bpsToPercentText(200)).toBe('2');
    expect(bpsToPercentText(1275)).toBe('12.75');
    expect(bpsToPercentText(5)).toBe('0.05');
  });

  it('summarises a deposit rule with the deposits package’s formatting', () => {
    const rule = { percentBps: 200, min: 2_500_000, max: 6_000_000, currency: 'USD' };
    expect(depositRuleShort(rule, 'en-US')).toBe(
      `2% of list value, ${formatMoney(2_500_000, 'USD', 'en-US')}–${formatMoney(6_000_000, 'USD', 'en-US')}`,
    );
    expect(depositRuleShort({ ...rule, min: 0 }, 'en-US')).toBe(
      '2% of list value, up to $60,000.00',
    );
    expect(depositRuleShort({ ...rule, min: 0, max: 0 })).toBe('No deposit');
  });
});
