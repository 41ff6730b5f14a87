import { DestroyRef, Injectable, inject } from '@angular/core';
import type { TokenResponse } from '@nightyard/contracts';

/** What one tab tells the others of the same browser about the session they share. */
export type TabMessage = { kind: 'tokens'; tokens: TokenResponse } | { kind: 'signed-out' };

const CHANNEL = 'nightyard.auth';
const LOCK = 'nightyard.auth.refresh';

/**
 * The tabs of one browser share the refresh cookie. Only one of them refreshes at a time (a Web
 * Lock), and it hands the new access token to the others (a BroadcastChannel), which then need
 * not refresh at all. Where a browser has neither, each tab works alone (the API's grace window
 * still lets tabs that refresh at the same moment share the session).
 */
@Injectable({ providedIn: 'root' })
export class AuthTabs {
  private readonly channel = typeof BroadcastChannel === 'undefined' ? null : new BroadcastChannel(CHANNEL);
  private readonly listeners = new Set<(m: TabMessage) => void>();

  constructor() {
    if (this.channel)
      this.channel.onmessage = (e: MessageEvent<TabMessage>) => this.listeners.forEach((l) => l(e.data));
    inject(DestroyRef).onDestroy(() => this.channel?.close());
  }

  /** Runs `work` while no other tab of this browser refreshes. */
  exclusive<T>(work: () => Promise<T>): Promise<T> {
    const locks = typeof navigator === 'undefined' ? undefined : navigator.locks;
    return locks ? (locks.request(LOCK, work) as Promise<T>) : work();
  }

  tell(message: TabMessage): void {
    this.channel?.postMessage(message);
  }

  listen(listener: (m: TabMessage) => void): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }
}
