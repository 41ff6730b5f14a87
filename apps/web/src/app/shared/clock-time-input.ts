import { Directive, inject } from '@angular/core';
import { NgControl, type ValidatorFn } from '@angular/forms';
import { CLOCK_TIME, CLOCK_TIME_MESSAGE, normaliseClockTime } from '@nightyard/contracts/depot-time';

/**
 * A time of day typed as `HH:mm`, 24-hour, in a plain text field (the browser's own time field
 * shows a 12-hour clock in many languages). Numbers only work too: "2130" or "9.05" becomes
 * "21:30" or "09:05" when the field is left. Use it on `<input matInput nyClockTime>` with
 * `clockTimeValidator` on the control.
 */
@Directive({
  selector: 'input[nyClockTime]',
  host: {
    type: 'text',
    inputmode: 'numeric',
    autocomplete: 'off',
    spellcheck: 'false',
    maxlength: '5',
    placeholder: 'HH:mm',
    '(blur)': 'normalise()',
  },
})
export class ClockTimeInput {
  private readonly control = inject(NgControl, { self: true, optional: true });

  protected normalise(): void {
    const control = this.control?.control;
    const value: unknown = control?.value;
    if (!control || typeof value !== 'string' || CLOCK_TIME.test(value)) return;
    const time = normaliseClockTime(value);
    if (time) control.setValue(time);
  }
}

/**
 * Valid when the value is `HH:mm` (00:00 to 23:59). The error sits under `key` (the forms of the
 * app name their message keys differently); `empty` is the message for a blank field.
 */
export function clockTimeValidator(empty: string, key = 'message', message = CLOCK_TIME_MESSAGE): ValidatorFn {
  return (c) => {
    const v = typeof c.value === 'string' ? c.value.trim() : '';
    if (!v) return { [key]: empty };
    return CLOCK_TIME.test(v) ? null : { [key]: message };
  };
}
