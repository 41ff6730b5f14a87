import pg from 'pg';
import type { Logger } from 'pino';

/** Waits between attempts to listen again: short, since until then every request reads afresh. */
const RETRY_MS = [500, 1_000, 2_000, 5_000];

export interface NotifiedCacheOptions {
  /** The channel whose notifications name a group to forget (triggers send the id as payload). */
  channel: string;
  /** Channels whose every notification forgets everything (a change that touches every group). */
  forgetAllOn?: readonly string[];
  /** Most groups kept; the least recently kept go first. */
  maxGroups?: number;
  log?: Logger;
}

/**
 * Values read from the database, kept while PostgreSQL notifies every change to what they were
 * read from. Triggers notify a channel with the id of the group that changed (a user, a depot); a
 * connection of its own listens. A value is served only while that connection is listening: when
 * it drops, everything is forgotten and callers read afresh until it listens again, so a change
 * can never be missed. A read that was under way while any change arrived is not kept: it may
 * have seen the old rows (`mark` before reading, `keep` with the mark after).
 */
export class NotifiedCache<V> {
  private readonly groups = new Map<string, Map<string, V>>();
  private client: pg.Client | null = null;
  private listening = false;
  /** Counts changes heard (and losses of the connection) so reads begun before one are dropped. */
  private changes = 0;
  private attempts = 0;
  private retry: NodeJS.Timeout | null = null;
  private closed = false;

  constructor(
    private readonly connectionString: string,
    private readonly options: NotifiedCacheOptions,
  ) {}

  /** Connects and listens; resolves once listening or once the first attempt has failed (it retries). */
  async start(): Promise<void> {
    if (this.closed || this.client) return;
    // Named, so an operator (or a test) can tell the listening connection apart.
    const client = new pg.Client({
      connectionString: this.connectionString,
      application_name: `nightyard listens ${this.options.channel}`,
    });
    this.client = client;
    // Without a listener a lost connection would end the process; here it only pauses the cache.
    client.on('error', (err) => this.lost(client, err));
    client.on('end', () => this.lost(client));
    client.on('notification', (message) => {
      if (message.channel === this.options.channel && message.payload) this.forget(message.payload);
      else if (this.options.forgetAllOn?.includes(message.channel)) this.forgetAll();
    });
    try {
      await client.connect();
      for (const channel of [this.options.channel, ...(this.options.forgetAllOn ?? [])])
        await client.query(`LISTEN ${channel}`);
      if (this.client !== client) return;
      this.listening = true;
      this.attempts = 0;
    } catch (err) {
      this.lost(client, err);
    }
  }

  /** The value as last read, when it can be trusted (undefined: read it). */
  get(group: string, key: string): V | undefined {
    return this.listening ? this.groups.get(group)?.get(key) : undefined;
  }

  /** A token of the moment a read begins; pass it back with what the read found. */
  mark(): number {
    return this.changes;
  }

  /** Keeps what a read found, unless anything changed (or the connection dropped) meanwhile. */
  keep(group: string, key: string, value: V, mark: number): void {
    if (!this.listening || mark !== this.changes) return;
    const values = this.groups.get(group) ?? new Map<string, V>();
    this.groups.delete(group);
    this.groups.set(group, values.set(key, value));
    if (this.groups.size > (this.options.maxGroups ?? 10_000)) this.groups.delete(this.groups.keys().next().value!);
  }

  /** The kept value, else `load`'s (kept for next time unless something changed meanwhile; null is never kept). */
  async read<T extends V>(group: string, key: string, load: () => Promise<T | null>): Promise<V | null> {
    const known = this.get(group, key);
    if (known !== undefined) return known;
    const mark = this.mark();
    const loaded = await load();
    if (loaded !== null) this.keep(group, key, loaded, mark);
    return loaded;
  }

  forget(group: string): void {
    this.changes += 1;
    this.groups.delete(group);
  }

  forgetAll(): void {
    this.changes += 1;
    this.groups.clear();
  }

  /**
   * Resolves once every notification of a transaction committed before the call has been heard:
   * a round trip on the listening connection (PostgreSQL sends pending notifications before the
   * answer). The API calls it after each write request, so the writer's next request never finds
   * what it just changed as it was.
   */
  async sync(): Promise<void> {
    const client = this.client;
    if (!client || !this.listening) return;
    await client.query('SELECT 1').catch((err: unknown) => this.lost(client, err));
  }

  get isListening(): boolean {
    return this.listening;
  }

  async close(): Promise<void> {
    this.closed = true;
    if (this.retry) clearTimeout(this.retry);
    const client = this.client;
    this.client = null;
    this.pause();
    await client?.end().catch(() => undefined);
  }

  private pause(): void {
    this.listening = false;
    this.forgetAll();
  }

  private lost(client: pg.Client, err?: unknown): void {
    if (this.client !== client) return;
    this.client = null;
    this.pause();
    void client.end().catch(() => undefined);
    if (this.closed) return;
    const wait = RETRY_MS[Math.min(this.attempts, RETRY_MS.length - 1)]!;
    this.attempts += 1;
    this.options.log?.warn(
      { err, channel: this.options.channel, retryInMs: wait },
      'change notifications lost; reading afresh until they resume',
    );
    this.retry = setTimeout(() => {
      this.retry = null;
      void this.start();
    }, wait);
    this.retry.unref();
  }
}
