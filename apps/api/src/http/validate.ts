import type { ZodType, z } from 'zod';
import { fieldPath } from '@nightyard/contracts';
import { DomainError } from './errors';

/** Parses `value` or throws a validation error naming each field (for `where`: body, query...). */
export function parseOrThrow<S extends ZodType>(schema: S, value: unknown, where: string): z.output<S> {
  const result = schema.safeParse(value);
  if (result.success) return result.data;
  const fields: Record<string, string> = {};
  for (const issue of result.error.issues) {
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) {
        const path = fieldPath([...issue.path, key]);
        fields[path || where] = `Unknown field "${key}": remove it`;
      }
      continue;
    }
    const path = fieldPath(issue.path) || where;
    fields[path] ??= issue.code === 'invalid_type' && issue.input === undefined ? 'Required' : issue.message;
  }
  const names = Object.keys(fields);
  const message =
    names.length === 1 ? `Check ${names[0]}: ${fields[names[0]!]}` : `Check these fields: ${names.join(', ')}`;
  throw new DomainError('validation_failed', message, fields);
}
