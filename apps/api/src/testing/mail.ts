import { TEST_FAKE_MAIL_URL } from './test-env';

export interface CaughtMail {
  to: string[];
  subject: string;
  text: string;
}

/** Messages the fake SMTP server received for one address, newest first; waits for them. */
export async function mailFor(address: string, atLeast = 1, timeoutMs = 5000): Promise<CaughtMail[]> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const res = await fetch(`${TEST_FAKE_MAIL_URL}/messages?to=${encodeURIComponent(address)}`);
    const { messages } = (await res.json()) as { messages: CaughtMail[] };
    if (messages.length >= atLeast || Date.now() > deadline) return messages;
    await new Promise((r) => setTimeout(r, 100));
  }
}

export function linkToken(text: string): string {
  const match = /token=([\w-]+)/.exec(text);
  if (!match) throw new Error(`No link with a token in: ${text}`);
  return match[1]!;
}
