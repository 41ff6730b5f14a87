import { z } from 'zod';

/** "The service limit" -> "the service limit", to use a field's name inside a sentence. */
export const lower = (what: string) => what.charAt(0).toLowerCase() + what.slice(1);

// A NUL cannot be stored in PostgreSQL text, and a lone UTF-16 surrogate cannot be written as
// UTF-8 without being altered: both are refused at the door so what is stored is what was sent.
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

/** `String.prototype.isWellFormed` where the engine has it (fast on 20 MB files), else a scan. */
function wellFormed(value: string): boolean {
  const native = (value as { isWellFormed?: () => boolean }).isWellFormed;
  return native ? native.call(value) : !LONE_SURROGATE.test(value);
}

/** Why `value` cannot be stored as text, or null when it can. */
export function textProblem(value: string, what = 'The text'): string | null {
  if (value.includes('\u0000')) return `${what} contains a NUL character (\\u0000): remove it`;
  if (!wellFormed(value)) return `${what} contains an incomplete character (a lone UTF-16 surrogate): retype it`;
  return null;
}

/**
 * Every string an API request carries: NUL-free and well-formed. Chain `.trim()`, `.min()`,
 * `.max()`, `.regex()` as on `z.string()`; `what` names the field in the message.
 */
export const text = (what = 'The text') =>
  z
    .string({
      // The schema's message is for what is not text at all; a `.max()` without its own message
      // says the limit (it read "Enter the reason as text" for 5,000 characters of text).
      error: (issue) =>
        issue.code === 'invalid_type'
          ? `Enter ${lower(what)} as text`
          : issue.code === 'too_big'
            ? `${what} is at most ${Number(issue.maximum).toLocaleString('en-US')} characters: shorten it`
            : issue.code === 'too_small'
              ? `Enter ${lower(what)}`
              : undefined,
    })
    .check((ctx) => {
      const problem = textProblem(ctx.value, what);
      if (problem) ctx.issues.push({ code: 'custom', message: problem, input: ctx.value });
    });
