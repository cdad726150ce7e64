/**
 * Guards a spreadsheet cell against formula injection: text that starts with `=`, `+`, `-`, `@`
 * (or a tab or carriage return, which some spreadsheet programs skip before reading a formula) is
 * prefixed with a single quote so it is shown as text, never run. This follows the OWASP "CSV
 * Injection" guidance (from memory: prefix such cells with `'`). Numbers are left alone: they are
 * written as numbers, and a negative number is not a formula.
 */
export function csvSafeCell(value: string | number | boolean | null | undefined): string | number {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return value;
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  return /^[=+\-@\t\r]/.test(value) ? `'${value}` : value;
}
