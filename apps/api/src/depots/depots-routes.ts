import { ROLES, depotListSchema } from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import type { ApiRoutes } from '../http/route';
import { listDepotSummaries } from './depots-service';

export function depotsRoutes(api: ApiRoutes, { db }: AppDeps) {
  api.add(
    { method: 'get', path: '/depots', summary: 'The organisation\'s depots with a summary of each', tag: 'depots',
      access: ROLES, response: depotListSchema },
    async ({ user }) => ({ depots: await listDepotSummaries(db, user) }),
  );
}
