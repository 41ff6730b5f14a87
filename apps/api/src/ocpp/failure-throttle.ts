import type { Clock } from '../time/clock';

/**
 * Counts recent failures per key (a charger identity, a remote address) in this process and
 * says when a key has had too many. Kept in memory: a charger talks to one API process, and a
 * refused attempt must not cost a database round trip. Bounded so a flood of invented
 * identities cannot grow it without end.
 */
export class FailureThrottle {
  private readonly failures = new Map<string, number[]>();

  constructor(
    private readonly limit: number,
    private readonly windowMs: number,
    private readonly clock: Clock,
    private readonly maxKeys = 10_000,
  ) {}

  blocked(key: string): boolean {
    return this.recent(key).length >= this.limit;
  }

  fail(key: string): void {
    const list = this.recent(key);
    list.push(this.clock().getTime());
    this.failures.delete(key);
    this.failures.set(key, list);
    if (this.failures.size > this.maxKeys) this.sweep();
  }

  private recent(key: string): number[] {
    const since = this.clock().getTime() - this.windowMs;
    return (this.failures.get(key) ?? []).filter((t) => t > since);
  }

  private sweep() {
    for (const key of [...this.failures.keys()]) if (this.recent(key).length === 0) this.failures.delete(key);
    // Still too many: forget the keys that failed longest ago (Map keeps insertion order).
    for (const key of this.failures.keys()) {
      if (this.failures.size <= this.maxKeys) break;
      this.failures.delete(key);
    }
  }
}
