import { eq } from 'drizzle-orm';
import { outboxSchema, ADMINS } from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import { users } from '../db/schema';
import { DomainError, notFound } from '../http/errors';
import type { ApiRoutes } from '../http/route';

/**
 * Development only: what the local fake mail server received, for admins to read. The fake
 * server catches every organisation's mail, so an admin sees only messages addressed wholly to
 * people of their own organisation. Production never serves it, whatever FAKE_MAIL_URL says.
 */
export function outboxRoutes(api: ApiRoutes, { config, db }: AppDeps) {
  api.add(
    {
      method: 'get',
      path: '/dev/outbox',
      summary: 'Messages caught by the local fake mail server (development only)',
      tag: 'development',
      access: ADMINS,
      response: outboxSchema,
    },
    async ({ user }) => {
      if (config.NODE_ENV === 'production' || !config.FAKE_MAIL_URL)
        throw notFound('The outbox (there is no local mail server here)');
      const res = await fetch(new URL('/messages', config.FAKE_MAIL_URL)).catch(() => null);
      if (!res?.ok) throw new DomainError('internal', 'The local mail server does not answer');
      const { messages } = outboxSchema.parse(await res.json());
      const people = await db
        .select({ email: users.email })
        .from(users)
        .where(eq(users.organisationId, user.organisationId));
      const ours = new Set(people.map((p) => p.email.toLowerCase()));
      return { messages: messages.filter((m) => m.to.length > 0 && m.to.every((a) => ours.has(a.toLowerCase()))) };
    },
  );
}
