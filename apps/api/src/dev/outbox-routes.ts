import { outboxSchema } from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import { DomainError, notFound } from '../http/errors';
import type { ApiRoutes } from '../http/route';

/** Development only: what the local fake mail server received, for admins to read. */
export function outboxRoutes(api: ApiRoutes, { config }: AppDeps) {
  api.add(
    { method: 'get', path: '/dev/outbox', summary: 'Messages caught by the local fake mail server (development only)',
      tag: 'development', access: ['admin'], response: outboxSchema },
    async () => {
      if (!config.FAKE_MAIL_URL) throw notFound('The outbox (there is no local mail server here)');
      const res = await fetch(new URL('/messages', config.FAKE_MAIL_URL)).catch(() => null);
      if (!res?.ok) throw new DomainError('internal', 'The local mail server does not answer');
      return outboxSchema.parse(await res.json());
    },
  );
}
