import { depotIdParamsSchema, depotListSchema, depotNightSchema, EVERY_ROLE } from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import type { ApiRoutes } from '../http/route';
import { depotNight } from '../night/depot-night';
import { listDepotSummaries } from './depots-service';

export function depotsRoutes(api: ApiRoutes, { db, clock }: AppDeps) {
  api.add(
    {
      method: 'get',
      path: '/depots',
      summary: "The organisation's depots with a summary of each",
      tag: 'depots',
      access: EVERY_ROLE,
      response: depotListSchema,
    },
    async ({ user }) => ({ depots: await listDepotSummaries(db, user, clock()) }),
  );
  api.add(
    {
      method: 'get',
      path: '/depots/:depotId/night',
      summary: 'Which night it is at the depot: the night in force, the next one, and "tonight"',
      tag: 'depots',
      access: EVERY_ROLE,
      params: depotIdParamsSchema,
      response: depotNightSchema,
    },
    async ({ user, params }) => depotNight(db, user, params.depotId, clock()),
  );
}
