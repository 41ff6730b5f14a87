import { HttpEventType, provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import type { LiveEvent } from '@nightyard/contracts';
import { LiveTransport } from './live-transport';

const DEPOT = '00000000-0000-4000-8000-0000000000d1';

describe('LiveTransport', () => {
  it('asks for the event stream and turns the text as it arrives into checked events', () => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    const mock = TestBed.inject(HttpTestingController);
    const events: LiveEvent[] = [];
    let completed = false;
    TestBed.inject(LiveTransport)
      .open(DEPOT)
      .subscribe({ next: (e) => events.push(e), complete: () => (completed = true) });
    const req = mock.expectOne(`/api/depots/${DEPOT}/live`);
    expect(req.request.headers.get('Accept')).toBe('text/event-stream');
    expect(req.request.reportProgress).toBe(true);
    const snapshot = 'event: snapshot\ndata: {"type":"snapshot","at":"2026-12-02T04:00:00.000Z","chargers":[]}\n\n';
    const fault =
      'event: charger\ndata: {"type":"charger","at":"2026-12-02T04:00:01.000Z","charger":' +
      '{"chargerId":"00000000-0000-4000-8000-0000000000c1","label":"C1","status":"faulted","powerKw":null,"seenAt":null}}\n\n';
    const unknown = 'event: future\ndata: {"type":"future"}\n\n: keep-alive\n\n';
    let text = snapshot + fault.slice(0, 40);
    req.event({ type: HttpEventType.DownloadProgress, loaded: text.length, partialText: text });
    expect(events.map((e) => e.type)).toEqual(['snapshot']);
    text += fault.slice(40) + unknown;
    req.event({ type: HttpEventType.DownloadProgress, loaded: text.length, partialText: text });
    expect(events.map((e) => e.type)).toEqual(['snapshot', 'charger']);
    expect(events[1]).toMatchObject({ charger: { label: 'C1', status: 'faulted' } });
    req.flush(text);
    expect(completed).toBe(true);
    mock.verify();
  });
});
