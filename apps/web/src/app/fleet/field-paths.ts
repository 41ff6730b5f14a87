import type { AbstractControl } from '@angular/forms';
import { fieldPathSegments } from '@nightyard/contracts/field-path';
import type { ProblemItem } from '../shared/problem-summary';

/** "runs[3].pullIn" -> "Row 4, pull-in"; other paths as given. */
export function describePath(path: string, names: Record<string, string> = {}): string {
  let seg = fieldPathSegments(path);
  // "runs[3].pullIn": the table is the runs, so "Row 4, pull-in".
  if (seg[0] === 'runs' && typeof seg[1] === 'number') seg = seg.slice(1);
  const text = seg.map((s) => (typeof s === 'number' ? `row ${s + 1}` : (names[s] ?? s))).join(', ');
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/**
 * Puts each API field message on the control at its path (as the `server` error, touched so it
 * shows) and returns the ones that match no control, worded for a problem list.
 */
export function applyPathErrors(
  root: AbstractControl,
  fields: Record<string, string>,
  names: Record<string, string> = {},
): ProblemItem[] {
  const leftOver: ProblemItem[] = [];
  for (const [path, message] of Object.entries(fields)) {
    const seg = fieldPathSegments(path);
    const control = seg.length ? root.get(seg) : null;
    if (control) {
      control.setErrors({ ...(control.errors ?? {}), server: message });
      control.markAsTouched();
    } else {
      leftOver.push({ where: describePath(path, names), message });
    }
  }
  return leftOver;
}
