import {
  AbstractControl,
  FormControl,
  ValidationErrors,
  ValidatorFn,
  Validators,
} from '@angular/forms';
import { IsoDate, toIsoDate, windowLength } from './iso-date';
import { maxUseWindowDays } from '@evalon/contracts/values';

/** The two date controls of a case-days range (first and last case day, picker dates). */
export interface CaseDaysControls {
  useFrom: FormControl<Date | null>;
  useTo: FormControl<Date | null>;
}

/** A form group that holds case-days controls (other controls beside them are fine). */
export interface CaseDaysGroup {
  readonly controls: CaseDaysControls;
  hasError(errorCode: string): boolean;
}

/** Required first and last case day controls, for a `mat-date-range-input`. */
export function caseDaysControls(): CaseDaysControls {
  return {
    useFrom: new FormControl<Date | null>(null, { validators: [Validators.required] }),
    useTo: new FormControl<Date | null>(null, { validators: [Validators.required] }),
  };
}

function validDate(value: unknown): value is Date {
  return value instanceof Date && !Number.isNaN(value.getTime());
}

/**
 * Checks the case days of a group as a pair, the way the server will: the first case day not
 * before today at the campus (`todayFor`), the last not before the first, and at most
 * {@link maxUseWindowDays} days of cases. Errors sit on the group: `pastStart`,
 * `endBeforeStart`, `tooLong`.
 */
export function caseDaysValidator(todayFor: () => IsoDate): ValidatorFn {
  return (group: AbstractControl): ValidationErrors | null => {
    const from: unknown = group.get('useFrom')?.value;
    const to: unknown = group.get('useTo')?.value;
    if (!validDate(from)) return null;
    const start = toIsoDate(from);
    if (start < todayFor()) return { pastStart: true };
    if (!validDate(to)) return null;
    const end = toIsoDate(to);
    if (end < start) return { endBeforeStart: true };
    if (windowLength(start, end) > maxUseWindowDays) return { tooLong: true };
    return null;
  };
}

/**
 * The first problem with a case-days range in plain words, or null. Server messages (under
 * `server`, from a 422) come first because they know what the form cannot.
 */
export function caseDaysError(group: CaseDaysGroup): string | null {
  const { useFrom, useTo } = group.controls;
  const server = (useFrom.getError('server') ?? useTo.getError('server')) as string | undefined;
  if (server) return server;
  if (useFrom.hasError('matDatepickerParse') || useTo.hasError('matDatepickerParse')) {
    return 'Write dates as MM/DD/YYYY, or pick them in the calendar.';
  }
  if (useFrom.hasError('required')) return 'Choose the first case day.';
  if (useTo.hasError('required')) return 'Choose the last case day.';
  if (useFrom.hasError('matDatepickerMin') || group.hasError('pastStart')) {
    return 'The first case day can’t be in the past at this campus.';
  }
  if (useTo.hasError('matEndDateInvalid') || group.hasError('endBeforeStart')) {
    return 'The last case day is before the first.';
  }
  if (group.hasError('tooLong')) return `A loan covers at most ${maxUseWindowDays} days of cases.`;
  return null;
}

/** Whether the range's problem should show (after a touch or a submit attempt). */
export function caseDaysErrorShown(group: CaseDaysGroup): boolean {
  const { useFrom, useTo } = group.controls;
  return (useFrom.touched || useTo.touched) && caseDaysError(group) !== null;
}
