import {
  chooseDepotRequestSchema,
  chosenDepotSchema,
  dateNightSchema,
  depotIdParamsSchema,
  depotListSchema,
  depotNightSchema,
  EVERY_ROLE,
  serviceDayParamsSchema,
} from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import type { ApiRoutes } from '../http/route';
import { dateNight, depotNight } from '../night/depot-night';
import { chooseDepot, listDepotSummaries } from './depots-service';

export function depotsRoutes(api: ApiRoutes, { db, clock }: AppDeps) {
  api.add(
    {
      method: 'get',
      path: '/depots',
      summary: 'The depots the caller may see, with a summary of each, and the one they last chose',
      tag: 'depots',
      access: EVERY_ROLE,
      response: depotListSchema,
    },
    async ({ user }) => listDepotSummaries(db, user, clock()),
  );
  api.add(
    {
      method: 'put',
      path: '/me/depot',
      summary: 'Remember the depot the caller works on (one they may see)',
      tag: 'depots',
      access: EVERY_ROLE,
      body: chooseDepotRequestSchema,
      response: chosenDepotSchema,
    },
    async ({ user, body }) => chooseDepot(db, user, body.depotId),
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
  api.add(
    {
      method: 'get',
      path: '/depots/:depotId/nights/:date',
      summary: 'Where a date stands among the service days: its own night, or inside the night of the day before it',
      tag: 'depots',
      access: EVERY_ROLE,
      params: serviceDayParamsSchema,
      response: dateNightSchema,
    },
    async ({ user, params }) => dateNight(db, user, params.depotId, params.date),
  );
}
