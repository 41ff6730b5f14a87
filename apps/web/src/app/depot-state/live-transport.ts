import { HttpClient, HttpEventType } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { liveEventSchema, type LiveEvent } from '@nightyard/contracts';
import { type Observable, defer, mergeMap } from 'rxjs';
import { SseParser } from './sse-parser';

/**
 * Opens a depot's live stream (GET /api/depots/:id/live, Server-Sent Events). It goes through
 * HttpClient, so the sign-in's interceptors add the access token as a header (never in the
 * address) and refresh it on a 401; the fetch backend hands over the text as it arrives. The
 * observable completes when the server ends the stream and fails when it cannot be opened.
 */
@Injectable({ providedIn: 'root' })
export class LiveTransport {
  private readonly http = inject(HttpClient);

  open(depotId: string): Observable<LiveEvent> {
    return defer(() => {
      const parser = new SseParser();
      return this.http
        .get(`/api/depots/${encodeURIComponent(depotId)}/live`, {
          observe: 'events',
          reportProgress: true,
          responseType: 'text',
          headers: { Accept: 'text/event-stream' },
        })
        .pipe(
          mergeMap((e) => (e.type === HttpEventType.DownloadProgress ? parser.feedAll(e.partialText ?? '') : [])),
          mergeMap((m) => {
            const parsed = safeJson(m.data);
            const event = liveEventSchema.safeParse(parsed);
            // An event this version does not know is skipped, not fatal.
            return event.success && event.data.type === m.event ? [event.data] : [];
          }),
        );
    });
  }
}

function safeJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return null;
  }
}
