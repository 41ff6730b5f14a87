// A local stand-in for the organisation's mail server. It accepts every message over real SMTP
// and keeps it in memory; an HTTP endpoint lists what arrived, for the outbox page and the tests.
//   FAKE_SMTP_PORT (default 2525)   FAKE_MAIL_HTTP_PORT (default 2580)
import { createServer } from 'node:http';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';

interface StoredMessage {
  id: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string | null;
  /** The Date the sender put on the message (the app's clock), null without one. */
  sentAt: string | null;
  receivedAt: string;
}

const smtpPort = Number(process.env.FAKE_SMTP_PORT ?? 2525);
const httpPort = Number(process.env.FAKE_MAIL_HTTP_PORT ?? 2580);
const LIMIT = 500;
const messages: StoredMessage[] = [];
let seq = 0;

const smtp = new SMTPServer({
  authOptional: true,
  disabledCommands: ['STARTTLS'],
  banner: 'Nightyard local mail catcher',
  size: 5 * 1024 * 1024,
  onData(stream, session, callback) {
    simpleParser(stream)
      .then((mail) => {
        const to = session.envelope.rcptTo.map((r) => r.address);
        messages.unshift({
          id: String(++seq),
          from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
          to,
          subject: mail.subject ?? '',
          text: mail.text ?? '',
          html: typeof mail.html === 'string' ? mail.html : null,
          sentAt: mail.date ? mail.date.toISOString() : null,
          // The stand-in mail server's own receipt time, as a real one would stamp it (not the API's clock).
          // eslint-disable-next-line no-restricted-syntax -- see the line above
          receivedAt: new Date().toISOString(),
        });
        messages.length = Math.min(messages.length, LIMIT);
        callback();
      })
      .catch((err: Error) => callback(err));
  },
});

const http = createServer((req, res) => {
  const url = new URL(req.url ?? '/', 'http://localhost');
  if (url.pathname === '/messages' && req.method === 'GET') {
    const to = url.searchParams.get('to')?.toLowerCase();
    const list = to ? messages.filter((m) => m.to.some((a) => a.toLowerCase() === to)) : messages;
    res.writeHead(200, { 'content-type': 'application/json' });
    res.end(JSON.stringify({ messages: list }));
  } else if (url.pathname === '/messages' && req.method === 'DELETE') {
    messages.length = 0;
    res.writeHead(204).end();
  } else {
    res.writeHead(404, { 'content-type': 'application/json' }).end('{"error":"not found"}');
  }
});

smtp.listen(smtpPort, '127.0.0.1', () => {
  http.listen(httpPort, '127.0.0.1', () => {
    console.log(`fake mail: SMTP on 127.0.0.1:${smtpPort}, messages at http://127.0.0.1:${httpPort}/messages`);
  });
});

const stop = () => {
  smtp.close(() => http.close(() => process.exit(0)));
  setTimeout(() => process.exit(0), 1000).unref();
};
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
