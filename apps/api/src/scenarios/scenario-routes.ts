import { z } from 'zod';
import { depotIdParamsSchema, localDateTimeSchema, SCENARIO_READERS } from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import type { ApiRoutes } from '../http/route';
import { buildScenarioBase } from './scenario-base';

export function scenarioRoutes(api: ApiRoutes, { db }: AppDeps) {
  api.add(
    {
      method: 'get',
      path: '/depots/:depotId/scenario-base',
      summary: 'The site and tariff part of a scenario file for a horizon',
      tag: 'plans',
      access: SCENARIO_READERS,
      params: depotIdParamsSchema,
      query: z.strictObject({ start: localDateTimeSchema, end: localDateTimeSchema }),
      response: z.object({ scenario: z.record(z.string(), z.unknown()), notes: z.array(z.string()) }),
    },
    async ({ user, params, query }) => buildScenarioBase(db, user, params.depotId, query.start, query.end),
  );
}
