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
