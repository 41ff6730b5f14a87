import type { Logger } from 'pino';
import { NotifiedCache } from '../db/notified-cache';
import type { AuthUser } from './auth-user';

/** The channel the users table's triggers notify (migration 0012_user-changes). */
export const USER_CHANGED = 'nightyard_user_changed';

const everyCache = new Set<KnownUsers>();

/**
 * Tells this process's caches at once that a user changed, after the change is committed: the
 * database's notification follows a moment later, and the caller's very next request must not
 * find the user as they were.
 */
export function forgetUser(id: string): void {
  for (const cache of everyCache) cache.forget(id);
}

/**
 * Signed-in users as last read, so a request does not read its caller again: on Tonight that read
 * was one database round trip in three. The users table notifies every change that matters (a
 * deactivation, new roles, another name); see NotifiedCache for how nothing can go stale.
 */
export class KnownUsers {
  private readonly cache: NotifiedCache<AuthUser>;

  constructor(connectionString: string, log?: Logger) {
    this.cache = new NotifiedCache<AuthUser>(connectionString, { channel: USER_CHANGED, log });
    everyCache.add(this);
  }

  start(): Promise<void> {
    return this.cache.start();
  }

  /** The user as last read, when it can be trusted (null: read it). */
  get(id: string, organisationId: string): AuthUser | null {
    return this.cache.get(id, organisationId) ?? null;
  }

  /** A token of the moment a read begins; pass it back with what the read found. */
  mark(): number {
    return this.cache.mark();
  }

  /** Keeps what a read found, unless anything changed (or the connection dropped) meanwhile. */
  keep(user: AuthUser, mark: number): void {
    this.cache.keep(user.id, user.organisationId, user, mark);
  }

  forget(id: string): void {
    this.cache.forget(id);
  }

  /** See NotifiedCache.sync. */
  sync(): Promise<void> {
    return this.cache.sync();
  }

  get isListening(): boolean {
    return this.cache.isListening;
  }

  async close(): Promise<void> {
    everyCache.delete(this);
    await this.cache.close();
  }
}
