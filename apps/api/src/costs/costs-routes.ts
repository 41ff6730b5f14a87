import { z } from 'zod';
import {
  depotIdParamsSchema,
  isoDate,
  meterImportRequestSchema,
  meterImportResultSchema,
  monthCostsSchema,
  planCostsSchema,
  planIdParamsSchema,
  COST_EDITORS,
  COST_READERS,
} from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import type { ApiRoutes } from '../http/route';
import { DIESEL_BUS_MPG, monthCosts, planCosts } from './costs-service';
import { importMeterData } from './meter-import';

/** Finance and admins own the costs; supervisors and facilities read them. */

export function costsRoutes(api: ApiRoutes, { db, clock, costsInputs }: AppDeps) {
  api.add(
    {
      method: 'get',
      path: '/plans/:id/costs',
      summary: "A plan's projected cost, savings, per bus and per mile",
      tag: 'costs',
      access: COST_READERS,
      params: planIdParamsSchema,
      response: planCostsSchema,
    },
    async ({ user, params }) => planCosts(db, user, params.id),
  );
  api.add(
    {
      method: 'get',
      path: '/depots/:depotId/costs/month',
      summary: 'The billing period holding a date: projected and to date, peaks, nights',
      tag: 'costs',
      access: COST_READERS,
      params: depotIdParamsSchema,
      query: z.strictObject({
        date: isoDate(),
        dieselMpg: z.coerce.number().min(1, 'At least 1 mpg').max(30, 'At most 30 mpg').default(DIESEL_BUS_MPG),
      }),
      response: monthCostsSchema,
    },
    async ({ user, params, query }) =>
      monthCosts(db, user, params.depotId, query.date, clock(), query.dieselMpg, undefined, costsInputs),
  );
  api.add(
    {
      method: 'post',
      path: '/depots/:depotId/meter-data',
      summary: 'Import utility interval data (Green Button XML or CSV), all or nothing',
      tag: 'costs',
      access: COST_EDITORS,
      params: depotIdParamsSchema,
      body: meterImportRequestSchema,
      response: meterImportResultSchema,
      status: 201,
      idempotent: true,
    },
    async ({ user, params, body }) => importMeterData(db, user, params.depotId, body, clock()),
  );
}
