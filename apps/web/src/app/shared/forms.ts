import { AbstractControl, FormGroup, ValidationErrors, ValidatorFn } from '@angular/forms';
import { passwordRule } from '@evalon/contracts/values';

/**
 * The contract's password rule as a form validator; the error (`password`) carries the contract's
 * message so the field says the same as the server would.
 */
export const passwordValidator: ValidatorFn = (
  control: AbstractControl,
): ValidationErrors | null => {
  const value: unknown = control.value;
  if (typeof value !== 'string' || value === '') return null; // `required` speaks for empty.
  if (value.length < passwordRule.minLength) return { password: passwordRule.tooShort };
  if (value.length > passwordRule.maxLength) return { password: passwordRule.tooLong };
  return null;
};

/** Validator for a "type it again" field that must equal the sibling control `otherName`. */
export function matchesSibling(otherName: string): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const other = control.parent?.get(otherName);
    if (!other || !control.value) return null;
    return control.value === other.value ? null : { mismatch: true };
  };
}

/**
 * Shows the server's per-field messages on the matching controls (under the `server` key);
 * returns whether any field took a message.
 */
export function applyServerErrors(
  form: FormGroup,
  fieldErrors: Readonly<Record<string, string>>,
): boolean {
  let applied = false;
  for (const [name, message] of Object.entries(fieldErrors)) {
    const control = form.get(name);
    if (!control) continue;
    control.setErrors({ ...control.errors, server: message });
    control.markAsTouched();
    applied = true;
  }
  return applied;
}
