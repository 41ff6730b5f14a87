import type {
  AbstractControl,
  FormControl,
  FormGroupDirective,
  NgForm,
  ValidationErrors,
  ValidatorFn,
} from '@angular/forms';
import type { ErrorStateMatcher } from '@angular/material/core';
import { PASSWORD_MIN_LENGTH } from '@nightyard/contracts';

export { PASSWORD_MIN_LENGTH };
export const PASSWORD_MAX_LENGTH = 200;
export const PASSWORDS_DIFFER = 'The two passwords are not the same';

/** Group validator: `password` and `confirm` hold the same text. */
export const samePasswords: ValidatorFn = (group: AbstractControl): ValidationErrors | null => {
  const password = group.get('password')?.value as string | undefined;
  const confirm = group.get('confirm')?.value as string | undefined;
  return confirm && password !== confirm ? { mismatch: true } : null;
};

/** The repeat field shows the group's mismatch as its own error. */
export class RepeatPasswordMatcher implements ErrorStateMatcher {
  isErrorState(control: FormControl | null, form: FormGroupDirective | NgForm | null): boolean {
    if (!control) return false;
    const shown = control.touched || !!form?.submitted;
    return shown && (control.invalid || !!control.parent?.hasError('mismatch'));
  }
}
