// Helpers for the fuzzing specs (contracts and API): reach every leaf of a JSON value and swap one.

export type JsonPath = (string | number)[];

/** Every path in a JSON value, the value itself and each container included. */
export function leafPaths(value: unknown, at: JsonPath = []): JsonPath[] {
  if (Array.isArray(value)) return [at, ...value.flatMap((v, i) => leafPaths(v, [...at, i]))];
  if (value && typeof value === 'object')
    return [at, ...Object.entries(value).flatMap(([k, v]) => leafPaths(v, [...at, k]))];
  return [at];
}

/** A copy of `value` with `leaf` at `path` (left as it was where the path no longer leads anywhere). */
export function setAt(value: unknown, path: JsonPath, leaf: unknown): unknown {
  if (!path.length) return leaf;
  const copy = structuredClone(value) as Record<string | number, unknown>;
  let node: unknown = copy;
  for (const p of path.slice(0, -1)) {
    // An earlier change may have replaced a parent with a plain value: then this one is moot.
    if (!node || typeof node !== 'object') return copy;
    node = (node as Record<string | number, unknown>)[p];
  }
  if (node && typeof node === 'object') (node as Record<string | number, unknown>)[path.at(-1)!] = leaf;
  return copy;
}
