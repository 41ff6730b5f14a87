import type { AbstractControl, ValidatorFn } from '@angular/forms';
import type { ZodType } from 'zod';
import { fieldPathSegments } from '@nightyard/contracts/field-path';

/** A field message from the API that no visible control shows. */
export interface FieldProblem {
  path: string;
  message: string;
}

/**
 * Puts each API field message on the control at its path (as the `server` error, touched so it
 * shows) and returns the ones that match no control. `prefix` is dropped from the front of each
 * path first (e.g. `definition` or `windows`); a path that names a group marks the whole group.
 */
export function applyServerErrors(
  root: AbstractControl,
  fields: Record<string, string>,
  prefix?: string,
): FieldProblem[] {
  const leftOver: FieldProblem[] = [];
  for (const [path, message] of Object.entries(fields)) {
    let segments = fieldPathSegments(path);
    if (prefix && segments[0] === prefix) segments = segments.slice(1);
    const control = segments.length ? root.get(segments) : null;
    if (control) {
      control.setErrors({ ...(control.errors ?? {}), server: message });
      control.markAsTouched();
    } else {
      leftOver.push({ path, message });
    }
  }
  return leftOver;
}

function isEmpty(value: unknown): boolean {
  return value === null || value === undefined || (typeof value === 'string' && value.trim() === '');
}

/**
 * Validates a control with a contract's zod schema, so the form says what the API would say.
 * `empty` is the message for an empty control (omit it to let empty values through).
 */
export function zodValidator(schema: ZodType, empty?: string): ValidatorFn {
  return (control) => {
    const value: unknown = control.value;
    if (isEmpty(value)) return empty ? { zod: empty } : null;
    const result = schema.safeParse(typeof value === 'string' ? value.trim() : value);
    return result.success ? null : { zod: result.error.issues[0]?.message ?? 'Check this value' };
  };
}

/** The message to show under a control: the API's, then the form's own. */
export function errorText(control: AbstractControl | null): string {
  if (!control?.errors) return '';
  const e = control.errors;
  if (typeof e['server'] === 'string') return e['server'];
  if (typeof e['zod'] === 'string') return e['zod'];
  for (const value of Object.values(e)) if (typeof value === 'string') return value;
  return 'Check this value';
}
