// Field paths as the API names fields in its errors (`{ error: { fields: { path: message } } }`)
// and the forms find their controls by: `buses[3].stays[0].depart`, `[1].start`.

/** A zod issue's path (or any key list) written as a field path. */
export function fieldPath(path: readonly PropertyKey[]): string {
  let out = '';
  for (const p of path) out += typeof p === 'number' ? `[${p}]` : out ? `.${String(p)}` : String(p);
  return out;
}

/** A field path back as its keys: `definition.seasons[0].periods[1]` -> ['definition', 'seasons', 0, 'periods', 1]. */
export function fieldPathSegments(path: string): (string | number)[] {
  const out: (string | number)[] = [];
  for (const part of path.match(/[^.[\]]+|\[\d+\]/g) ?? []) {
    out.push(part.startsWith('[') ? Number(part.slice(1, -1)) : part);
  }
  return out;
}
