import type { Response } from 'express';
import type { LiveEvent } from '@nightyard/contracts';
import type { Logger } from 'pino';
import type { LiveBus } from './live-bus';

/** Unsent bytes beyond which a client is too slow to keep: its stream ends and it reconnects. */
export const MAX_BUFFERED_BYTES = 1024 * 1024;

/** One Server-Sent Events message: the event's type as `event:`, its JSON as one `data:` line. */
export function sseMessage(event: LiveEvent): string {
  return `event: ${event.type}\ndata: ${JSON.stringify(event)}\n\n`;
}

/**
 * Streams a depot's live events to one client as `text/event-stream`: the snapshot first, then
 * every event the bus carries for the depot, a comment line as heartbeat, and the end after the
 * stream's lifetime. Events that arrive while the snapshot is read wait and follow it. Everything
 * is released when either side closes; a failure ends the stream, never the process.
 */
export async function streamLive(opts: {
  res: Response;
  bus: LiveBus;
  depotId: string;
  userId: string;
  log: Logger;
  snapshot: () => Promise<LiveEvent>;
}): Promise<void> {
  const { res, bus, depotId, userId, log } = opts;
  const { heartbeatMs, maxMs } = bus.timing;
  let queue: LiveEvent[] | null = [];
  let closed = false;
  const timers: NodeJS.Timeout[] = [];
  const untrack = bus.trackStream(() => close(), userId);
  const off = bus.subscribe(depotId, (event) => {
    if (queue) queue.push(event);
    else write(sseMessage(event));
  });

  const close = (end = true) => {
    if (closed) return;
    closed = true;
    untrack();
    off();
    bus.closeStream(userId);
    for (const t of timers) clearTimeout(t);
    if (end && !res.writableEnded) res.end();
  };
  function write(chunk: string): void {
    if (closed || res.writableEnded || res.destroyed) return;
    if (res.writableLength > MAX_BUFFERED_BYTES) {
      log.warn({ depotId }, 'live stream ended: the client does not read');
      close();
      return;
    }
    res.write(chunk);
  }

  // The response's close, not the request's: a GET's request stream closes as soon as it is read.
  res.on('close', () => close());
  res.on('error', (err) => {
    log.debug({ err }, 'live stream socket error');
    close();
  });

  try {
    const first = await opts.snapshot();
    if (closed) return;
    res.status(200);
    res.setHeader('Content-Type', 'text/event-stream; charset=utf-8');
    // Reverse proxies that buffer answers (nginx) must pass each event on at once.
    res.setHeader('X-Accel-Buffering', 'no');
    res.flushHeaders();
    write(sseMessage(first));
    for (const event of queue) write(sseMessage(event));
    queue = null;
  } catch (err) {
    // Nothing sent yet: the error handler answers.
    close(false);
    throw err;
  }
  timers.push(setInterval(() => write(': keep-alive\n\n'), heartbeatMs));
  timers.push(setTimeout(() => close(), maxMs));
}
