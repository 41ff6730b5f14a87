import { DestroyRef } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import type { Charger, LiveCharger } from '@nightyard/contracts';
import { HttpErrorResponse } from '@angular/common/http';
import { FakeLiveTransport, provideFakeLive } from '../testing/live-fake';
import { LINGER_MS, LiveStore, RECONNECT, reconnectDelay } from './live-store';

const DEPOT = '00000000-0000-4000-8000-0000000000d1';
const AT = '2026-12-02T04:00:00.000Z';

/** A page's lifetime: destroy() releases its watch. */
function page(): DestroyRef & { destroy(): void } {
  const callbacks: (() => void)[] = [];
  return {
    onDestroy: (cb: () => void) => {
      callbacks.push(cb);
      return () => undefined;
    },
    destroyed: false,
    destroy: () => callbacks.forEach((cb) => cb()),
  } as unknown as DestroyRef & { destroy(): void };
}

const charger = (label: string, status: LiveCharger['status']): LiveCharger => ({
  chargerId: `charger-${label}`,
  label,
  status,
  powerKw: null,
  seenAt: AT,
});

describe('LiveStore', () => {
  let store: LiveStore;
  let live: FakeLiveTransport;

  beforeEach(() => {
    vi.useFakeTimers({ toFake: ['setTimeout', 'clearTimeout'] });
    TestBed.configureTestingModule({ providers: [provideFakeLive()] });
    store = TestBed.inject(LiveStore);
    live = TestBed.inject(FakeLiveTransport);
    // The middle of the ±20 % spread: waits are exactly 1 s, 2 s, 4 s...
    store.random = () => 0.5;
  });
  afterEach(() => vi.useRealTimers());

  it('waits longer after each failure, up to the longest wait, and from the start again once events flow', () => {
    const depot = store.watch(DEPOT, page());
    expect(depot.connection()).toBe('connecting');
    expect(live.streams).toHaveLength(1);

    const waits: number[] = [];
    for (let i = 0; i < 7; i++) {
      live.last.events.error(new HttpErrorResponse({ status: 0 }));
      expect(depot.connection()).toBe('waiting');
      const opened = live.streams.length;
      let waited = 0;
      while (live.streams.length === opened) {
        vi.advanceTimersByTime(250);
        waited += 250;
      }
      waits.push(waited);
    }
    expect(waits).toEqual([1000, 2000, 4000, 8000, 16000, 30000, 30000]);

    live.last.events.next({ type: 'snapshot', at: AT, chargers: [charger('C1', 'faulted')] });
    expect(depot.connection()).toBe('open');
    expect(depot.chargers().get('charger-C1')?.status).toBe('faulted');
    // The server ends a stream after its lifetime: a new one after the first wait, not the longest.
    live.last.events.complete();
    vi.advanceTimersByTime(999);
    expect(live.streams).toHaveLength(8);
    vi.advanceTimersByTime(1);
    expect(live.streams).toHaveLength(9);
  });

  it('spreads the waits by ±20 % so many clients do not come back at once', () => {
    expect(reconnectDelay(0, () => 0)).toBe(RECONNECT.firstMs * 0.8);
    expect(reconnectDelay(0, () => 1)).toBe(RECONNECT.firstMs * 1.2);
    expect(reconnectDelay(20, () => 1)).toBe(RECONNECT.maxMs * 1.2);
  });

  it('starts each connection from its snapshot and applies changes on top', () => {
    const depot = store.watch(DEPOT, page());
    live.last.events.next({
      type: 'snapshot',
      at: AT,
      chargers: [charger('C1', 'available'), charger('C2', 'charging')],
    });
    live.last.events.next({ type: 'charger', at: AT, charger: charger('C1', 'faulted') });
    expect([...depot.chargers().values()].map((c) => c.status)).toEqual(['faulted', 'charging']);
    expect(depot.generation()).toBe(1);
    live.last.events.complete();
    vi.advanceTimersByTime(1000);
    live.last.events.next({ type: 'snapshot', at: AT, chargers: [charger('C2', 'available')] });
    expect([...depot.chargers().keys()]).toEqual(['charger-C2']);
    expect(depot.generation()).toBe(2);
    const loaded: Pick<Charger, 'id' | 'live'>[] = [
      { id: 'charger-C2', live: null },
      { id: 'charger-C9', live: null },
    ];
    expect(depot.withLive(loaded).map((c) => c.live?.status ?? null)).toEqual(['available', null]);
  });

  it('stops when the depot is not found or not allowed', () => {
    const depot = store.watch(DEPOT, page());
    live.last.events.error(new HttpErrorResponse({ status: 404 }));
    expect(depot.connection()).toBe('stopped');
    vi.advanceTimersByTime(60_000);
    expect(live.streams).toHaveLength(1);
  });

  it('shares one stream between pages and closes it a little after the last one left', () => {
    const tonight = page();
    const yard = page();
    const a = store.watch(DEPOT, tonight);
    const b = store.watch(DEPOT, yard);
    expect(a).toBe(b);
    expect(live.streams).toHaveLength(1);
    tonight.destroy();
    yard.destroy();
    vi.advanceTimersByTime(LINGER_MS - 1);
    expect(live.openCount()).toBe(1);
    // A page that opens meanwhile keeps the same stream.
    const depot = page();
    store.watch(DEPOT, depot);
    vi.advanceTimersByTime(LINGER_MS);
    expect(live.streams).toHaveLength(1);
    expect(live.openCount()).toBe(1);
    depot.destroy();
    vi.advanceTimersByTime(LINGER_MS);
    expect(live.openCount()).toBe(0);
    expect(store.openStreams()).toBe(0);
  });

  it('does not reconnect for a page that has left', () => {
    const p = page();
    store.watch(DEPOT, p);
    live.last.events.error(new HttpErrorResponse({ status: 503 }));
    p.destroy();
    vi.advanceTimersByTime(LINGER_MS + 60_000);
    expect(live.streams).toHaveLength(1);
  });
});
