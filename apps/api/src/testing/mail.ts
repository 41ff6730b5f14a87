import { vi } from 'vitest';
import { TEST_FAKE_MAIL_URL } from './test-env';

export interface CaughtMail {
  to: string[];
  subject: string;
  text: string;
}

/** Messages the fake SMTP server received for one address, newest first; waits for them. */
export async function mailFor(address: string, atLeast = 1, timeoutMs = 5000): Promise<CaughtMail[]> {
  let messages: CaughtMail[] = [];
  try {
    return await vi.waitFor(
      async () => {
        const res = await fetch(`${TEST_FAKE_MAIL_URL}/messages?to=${encodeURIComponent(address)}`);
        ({ messages } = (await res.json()) as { messages: CaughtMail[] });
        if (messages.length < atLeast) throw new Error(`${messages.length} of ${atLeast} messages so far`);
        return messages;
      },
      { timeout: timeoutMs, interval: 100 },
    );
  } catch {
    // Fewer than asked for by the deadline: the caller asserts on what did arrive.
    return messages;
  }
}

export function linkToken(text: string): string {
  const match = /token=([\w-]+)/.exec(text);
  if (!match) throw new Error(`No link with a token in: ${text}`);
  return match[1]!;
}
