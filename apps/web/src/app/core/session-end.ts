import { Injectable } from '@angular/core';

/**
 * Tells whoever keeps something of a session (the form drafts) that it has really ended. A plain
 * go-between: the auth store, in the first download, needs nothing of what the listeners use
 * (Angular's forms stay in the sections that have forms).
 */
@Injectable({ providedIn: 'root' })
export class SessionEnd {
  private readonly listeners = new Set<() => void>();

  /** Calls `listener` each time a session ends; returns what stops it. */
  listen(listener: () => void): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  notify(): void {
    for (const listener of this.listeners) listener();
  }
}
