import { z } from 'zod';

/** "The service limit" -> "the service limit", to use a field's name inside a sentence. */
export const lower = (what: string) => what.charAt(0).toLowerCase() + what.slice(1);

// A NUL cannot be stored in PostgreSQL text, and a lone UTF-16 surrogate cannot be written as
// UTF-8 without being altered: both are refused at the door so what is stored is what was sent.
const NUL = /\u0000/;
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

/** Why `value` cannot be stored as text, or null when it can. */
export function textProblem(value: string, what = 'The text'): string | null {
  if (NUL.test(value)) return `${what} contains a NUL character (\\u0000): remove it`;
  if (LONE_SURROGATE.test(value)) return `${what} contains an incomplete character (a lone UTF-16 surrogate): retype it`;
  return null;
}

/**
 * Every string an API request carries: NUL-free and well-formed. Chain `.trim()`, `.min()`,
 * `.max()`, `.regex()` as on `z.string()`; `what` names the field in the message.
 */
export const text = (what = 'The text') =>
  z.string({ error: `Enter ${lower(what)} as text` }).check((ctx) => {
    const problem = textProblem(ctx.value, what);
    if (problem) ctx.issues.push({ code: 'custom', message: problem, input: ctx.value });
  });
