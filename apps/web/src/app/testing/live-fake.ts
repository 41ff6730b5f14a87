import { Injectable, type Provider } from '@angular/core';
import type { LiveEvent } from '@nightyard/contracts';
import { Observable, Subject } from 'rxjs';
import { LiveTransport } from '../depot-state/live-transport';

export interface FakeStream {
  depotId: string;
  events: Subject<LiveEvent>;
  /** Ended, failed or left by the client. */
  closed: boolean;
}

/** A live transport the test drives: each `open` is a stream the test feeds, fails or ends. */
@Injectable()
export class FakeLiveTransport {
  readonly streams: FakeStream[] = [];

  open(depotId: string): Observable<LiveEvent> {
    const stream: FakeStream = { depotId, events: new Subject<LiveEvent>(), closed: false };
    this.streams.push(stream);
    return new Observable<LiveEvent>((subscriber) => {
      const sub = stream.events.subscribe(subscriber);
      return () => {
        stream.closed = true;
        sub.unsubscribe();
      };
    });
  }

  /** The stream opened last. */
  get last(): FakeStream {
    const s = this.streams.at(-1);
    if (!s) throw new Error('No live stream was opened');
    return s;
  }

  /** Streams still open. */
  openCount(): number {
    return this.streams.filter((s) => !s.closed).length;
  }
}

/** Replaces the live stream in page tests; inject FakeLiveTransport to drive it. */
export function provideFakeLive(): Provider[] {
  return [FakeLiveTransport, { provide: LiveTransport, useExisting: FakeLiveTransport }];
}
