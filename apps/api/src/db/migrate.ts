import { migrate } from 'drizzle-orm/node-postgres/migrator';
import type { Db } from './client';

/** Applies the generated SQL migrations in `folder` (drizzle/ at the repository root). */
export async function applyMigrations(db: Db, folder: string): Promise<void> {
  await migrate(db, { migrationsFolder: folder });
}
