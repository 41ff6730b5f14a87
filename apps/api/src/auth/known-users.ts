import pg from 'pg';
import type { Logger } from 'pino';
import type { AuthUser } from './auth-user';

/** The channel the users table's triggers notify (migration 0012_user-changes). */
const CHANNEL = 'nightyard_user_changed';
const MAX_USERS = 10_000;
/** Waits between attempts to listen again: short, since until then every request reads its user. */
const RETRY_MS = [500, 1_000, 2_000, 5_000];

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
 * deactivation, new roles, another name) and a connection of its own listens; an entry is used
 * only while that connection is listening. When it drops, every entry is forgotten and each
 * request reads its user until the connection listens again, so a change can never be missed.
 * A read that was under way while any change arrived is not kept: it may have seen the old row.
 */
export class KnownUsers {
  private readonly users = new Map<string, AuthUser>();
  private client: pg.Client | null = null;
  private listening = false;
  /** Counts changes heard (and losses of the connection) so reads begun before one are dropped. */
  private changes = 0;
  private attempts = 0;
  private retry: NodeJS.Timeout | null = null;
  private closed = false;

  constructor(
    private readonly connectionString: string,
    private readonly log?: Logger,
  ) {
    everyCache.add(this);
  }

  /** Connects and listens; resolves once listening or once the first attempt has failed (it retries). */
  async start(): Promise<void> {
    if (this.closed || this.client) return;
    const client = new pg.Client({ connectionString: this.connectionString });
    this.client = client;
    // Without a listener a lost connection would end the process; here it only pauses the cache.
    client.on('error', (err) => this.lost(client, err));
    client.on('end', () => this.lost(client));
    client.on('notification', (message) => {
      if (message.channel === CHANNEL && message.payload) this.forget(message.payload);
    });
    try {
      await client.connect();
      await client.query(`LISTEN ${CHANNEL}`);
      if (this.client !== client) return;
      this.listening = true;
      this.attempts = 0;
    } catch (err) {
      this.lost(client, err);
    }
  }

  /** The user as last read, when it can be trusted (null: read it). */
  get(id: string, organisationId: string): AuthUser | null {
    if (!this.listening) return null;
    const user = this.users.get(id);
    return user && user.organisationId === organisationId ? user : null;
  }

  /** A token of the moment a read begins; pass it back with what the read found. */
  mark(): number {
    return this.changes;
  }

  /** Keeps what a read found, unless anything changed (or the connection dropped) meanwhile. */
  keep(user: AuthUser, mark: number): void {
    if (!this.listening || mark !== this.changes) return;
    this.users.delete(user.id);
    this.users.set(user.id, user);
    if (this.users.size > MAX_USERS) this.users.delete(this.users.keys().next().value!);
  }

  forget(id: string): void {
    this.changes += 1;
    this.users.delete(id);
  }

  get isListening(): boolean {
    return this.listening;
  }

  async close(): Promise<void> {
    this.closed = true;
    everyCache.delete(this);
    if (this.retry) clearTimeout(this.retry);
    const client = this.client;
    this.client = null;
    this.pause();
    await client?.end().catch(() => undefined);
  }

  private pause(): void {
    this.listening = false;
    this.changes += 1;
    this.users.clear();
  }

  private lost(client: pg.Client, err?: unknown): void {
    if (this.client !== client) return;
    this.client = null;
    this.pause();
    void client.end().catch(() => undefined);
    if (this.closed) return;
    const wait = RETRY_MS[Math.min(this.attempts, RETRY_MS.length - 1)]!;
    this.attempts += 1;
    this.log?.warn(
      { err, retryInMs: wait },
      'user change notifications lost; users are read per request until they resume',
    );
    this.retry = setTimeout(() => {
      this.retry = null;
      void this.start();
    }, wait);
    this.retry.unref();
  }
}
