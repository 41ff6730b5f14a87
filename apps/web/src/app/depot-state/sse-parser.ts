/** One Server-Sent Events message: its `event:` name (default "message") and its `data:` lines. */
export interface SseMessage {
  event: string;
  data: string;
}

/**
 * Reads Server-Sent Events (the text/event-stream format) from text that arrives in pieces.
 * Comment lines (`: keep-alive`) and fields other than event and data are skipped; a message
 * without data is dropped, as browsers do.
 */
export class SseParser {
  private buffer = '';
  private event = '';
  private data: string[] = [];
  private seen = 0;

  /** Takes the whole text received so far (it only grows) and answers the messages it completes. */
  feedAll(textSoFar: string): SseMessage[] {
    if (textSoFar.length < this.seen) this.seen = 0;
    const chunk = textSoFar.slice(this.seen);
    this.seen = textSoFar.length;
    return this.feed(chunk);
  }

  /** Takes the next piece of text and answers the messages it completes. */
  feed(chunk: string): SseMessage[] {
    this.buffer += chunk;
    const out: SseMessage[] = [];
    let match: RegExpExecArray | null;
    const line = /\r\n|\r(?!$)|\n/g;
    let start = 0;
    while ((match = line.exec(this.buffer))) {
      this.take(this.buffer.slice(start, match.index), out);
      start = match.index + match[0].length;
    }
    this.buffer = this.buffer.slice(start);
    return out;
  }

  private take(line: string, out: SseMessage[]): void {
    if (line === '') {
      if (this.data.length) out.push({ event: this.event || 'message', data: this.data.join('\n') });
      this.event = '';
      this.data = [];
      return;
    }
    if (line.startsWith(':')) return;
    const colon = line.indexOf(':');
    const field = colon < 0 ? line : line.slice(0, colon);
    let value = colon < 0 ? '' : line.slice(colon + 1);
    if (value.startsWith(' ')) value = value.slice(1);
    if (field === 'event') this.event = value;
    else if (field === 'data') this.data.push(value);
  }
}
