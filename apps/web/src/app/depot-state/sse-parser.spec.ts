import { SseParser } from './sse-parser';

describe('SseParser', () => {
  it('reads events split anywhere, skips comments and joins data lines', () => {
    const p = new SseParser();
    expect(p.feed(': keep-alive\n\nevent: char')).toEqual([]);
    expect(p.feed('ger\ndata: {"a":1}\n')).toEqual([]);
    expect(p.feed('\n')).toEqual([{ event: 'charger', data: '{"a":1}' }]);
    expect(p.feed('data: one\ndata:two\r\n\r\nid: 7\nretry: 10\n\n')).toEqual([{ event: 'message', data: 'one\ntwo' }]);
  });

  it('takes the whole text so far and answers only what is new', () => {
    const p = new SseParser();
    let text = 'event: plan\ndata: 1\n\nevent: plan\n';
    expect(p.feedAll(text)).toEqual([{ event: 'plan', data: '1' }]);
    text += 'data: 2\n\n';
    expect(p.feedAll(text)).toEqual([{ event: 'plan', data: '2' }]);
    expect(p.feedAll(text)).toEqual([]);
  });

  it('waits for the line feed after a carriage return at the end of a piece', () => {
    const p = new SseParser();
    expect(p.feed('data: x\r')).toEqual([]);
    expect(p.feed('\n\r\n')).toEqual([{ event: 'message', data: 'x' }]);
  });
});
