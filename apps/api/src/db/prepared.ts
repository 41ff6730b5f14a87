import type { Db } from './client';

const byDb = new WeakMap<Db, Map<string, unknown>>();

/**
 * A query the hottest routes run on every request, as a named statement: PostgreSQL parses and
 * plans it once per connection instead of each time. Built once per database handle.
 */
export function prepared<T>(db: Db, name: string, build: (db: Db, name: string) => T): T {
  let statements = byDb.get(db);
  if (!statements) byDb.set(db, (statements = new Map()));
  if (!statements.has(name)) statements.set(name, build(db, name));
  return statements.get(name) as T;
}
