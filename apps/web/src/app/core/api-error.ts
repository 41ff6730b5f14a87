import { HttpErrorResponse } from '@angular/common/http';
import type { AbstractControl, FormGroup } from '@angular/forms';
import type { ErrorBody } from '@nightyard/contracts';

/** What the client needs to know about a failed API call. */
export interface ApiProblem {
  status: number;
  code: string;
  message: string;
  fields: Record<string, string>;
}

const OFFLINE = 'Nightyard cannot be reached. Check the connection and try again.';
const SERVER = 'Something went wrong on our side. Try again in a moment.';

function isErrorBody(value: unknown): value is ErrorBody {
  if (typeof value !== 'object' || value === null || !('error' in value)) return false;
  const error = (value as { error: unknown }).error;
  return (
    typeof error === 'object' &&
    error !== null &&
    typeof (error as { message?: unknown }).message === 'string' &&
    typeof (error as { code?: unknown }).code === 'string'
  );
}

/** Turns anything thrown by HttpClient into `{ status, code, message, fields }` (also as a resource's error, which wraps it). */
export function toApiProblem(err: unknown): ApiProblem {
  if (err instanceof Error && err.cause instanceof HttpErrorResponse) return toApiProblem(err.cause);
  if (err instanceof HttpErrorResponse) {
    if (isErrorBody(err.error)) {
      return {
        status: err.status,
        code: err.error.error.code,
        message: err.error.error.message,
        fields: err.error.error.fields ?? {},
      };
    }
    if (err.status === 0) return { status: 0, code: 'offline', message: OFFLINE, fields: {} };
    return { status: err.status, code: 'internal', message: SERVER, fields: {} };
  }
  return { status: 0, code: 'internal', message: SERVER, fields: {} };
}

/**
 * Puts the API's field messages on the matching controls (as the `server` error) and returns
 * the messages that match no control, to be shown for the whole form.
 */
export function applyFieldErrors(form: FormGroup, fields: Record<string, string>): string[] {
  const leftOver: string[] = [];
  for (const [path, message] of Object.entries(fields)) {
    const control: AbstractControl | null = form.get(path.split('.')[0] ?? path);
    if (control) {
      control.setErrors({ ...(control.errors ?? {}), server: message });
      control.markAsTouched();
    } else {
      leftOver.push(message);
    }
  }
  return leftOver;
}
