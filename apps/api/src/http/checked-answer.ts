/**
 * Answers already parsed against their route's response schema, so the route does not parse them
 * again: a remembered answer (Tonight's) is parsed once when computed, then served many times
 * with only its instant renewed. Only a value built from a parsed one may be marked.
 */
const checked = new WeakSet<object>();

export function markChecked<T extends object>(answer: T): T {
  checked.add(answer);
  return answer;
}

export function isChecked(answer: unknown): boolean {
  return typeof answer === 'object' && answer !== null && checked.has(answer);
}

/**
 * JSON texts of checked answers, written once when remembered and sent as they are: a string, or
 * UTF-8 bytes (a remembered answer keeps its bytes, so it is not encoded again per request), or
 * parts of them written one after another (no copy into one buffer per request).
 */
const texts = new WeakMap<object, string | Buffer | readonly Buffer[]>();

/** A checked answer whose JSON text is known already (it must be the answer's JSON.stringify). */
export function markCheckedText<T extends object>(answer: T, text: string | Buffer | readonly Buffer[]): T {
  texts.set(answer, text);
  return markChecked(answer);
}

export function checkedTextOf(answer: unknown): string | Buffer | readonly Buffer[] | undefined {
  return typeof answer === 'object' && answer !== null ? texts.get(answer) : undefined;
}
