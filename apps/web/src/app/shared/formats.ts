import { LOCALE_ID, Pipe, PipeTransform, inject } from '@angular/core';
import { formatMoney } from '@evalon/deposits';
import type { Money } from '@evalon/contracts';
import { DayStyle, IsoDate, formatDay, formatWindow } from './iso-date';

/**
 * Money for people, with the currency's ISO 4217 decimals (the deposits package's rule). An
 * unknown currency code is shown as written rather than breaking the page.
 */
export function moneyText(money: Money | null | undefined, locale = 'en-US'): string {
  if (!money) return '—';
  try {
    return formatMoney(money.amount, money.currency, locale);
  } catch {
    return `${money.amount} ${money.currency} (minor units)`;
  }
}

/**
 * Sums amounts per currency (loans are single-lender, but a list may mix currencies), in order
 * of first appearance.
 */
export function sumMoney(amounts: readonly Money[]): Money[] {
  const totals = new Map<string, number>();
  for (const m of amounts) totals.set(m.currency, (totals.get(m.currency) ?? 0) + m.amount);
  return [...totals].map(([currency, amount]) => ({ amount, currency }));
}

/** `{{ deposit | money }}`: integer minor units plus currency, formatted for people. */
@Pipe({ name: 'money' })
export class MoneyPipe implements PipeTransform {
  private readonly locale = inject(LOCALE_ID);

  transform(value: Money | readonly Money[] | null | undefined): string {
    if (Array.isArray(value)) {
      return value.length ? value.map((m: Money) => moneyText(m, this.locale)).join(' + ') : '—';
    }
    return moneyText(value as Money | null | undefined, this.locale);
  }
}

/** `{{ '2026-12-14' | day }}` → "Mon, Dec 14, 2026"; the day as written, never shifted. */
@Pipe({ name: 'day' })
export class DayPipe implements PipeTransform {
  private readonly locale = inject(LOCALE_ID);

  transform(value: IsoDate | null | undefined, style: DayStyle = 'medium'): string {
    return value ? formatDay(value, style, this.locale) : '—';
  }
}

/** `{{ from | window: to }}` → "Dec 14 – Dec 16, 2026". */
@Pipe({ name: 'window' })
export class WindowPipe implements PipeTransform {
  private readonly locale = inject(LOCALE_ID);

  transform(from: IsoDate | null | undefined, to: IsoDate | null | undefined): string {
    if (!from || !to) return '—';
    return formatWindow(from, to, this.locale);
  }
}
