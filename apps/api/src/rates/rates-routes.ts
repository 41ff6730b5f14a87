import { z } from 'zod';
import {
  previewQuerySchema,
  ratePlanSchema,
  ratePreviewSchema,
  saveRatePlanSchema,
  urdbImportResultSchema,
  EVERY_ROLE,
  SETUP_EDITORS,
} from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import { visibleDepots } from '../depots/depots-service';
import type { ApiRoutes } from '../http/route';
import { previewDay } from '@nightyard/scheduling';
import * as ratePlanService from './rate-plans-service';
import { importUrdb } from './urdb-import';

const idParams = z.strictObject({ id: z.uuid('Not a rate plan id') });
const planBody = z.object({ ratePlan: ratePlanSchema });

export function ratesRoutes(api: ApiRoutes, { db, clock }: AppDeps) {
  api.add(
    {
      method: 'get',
      path: '/rate-plans',
      summary: "The organisation's rate plans",
      tag: 'rates',
      access: EVERY_ROLE,
      response: z.object({ ratePlans: z.array(ratePlanSchema) }),
    },
    async ({ user }) => ({ ratePlans: await ratePlanService.listRatePlans(db, user) }),
  );
  api.add(
    {
      method: 'get',
      path: '/rate-plans/:id',
      summary: 'One rate plan',
      tag: 'rates',
      access: EVERY_ROLE,
      params: idParams,
      response: planBody,
    },
    async ({ user, params }) => ({ ratePlan: await ratePlanService.getRatePlan(db, user, params.id) }),
  );
  api.add(
    {
      method: 'post',
      path: '/rate-plans',
      summary: 'Save a new rate plan',
      tag: 'rates',
      access: SETUP_EDITORS,
      body: saveRatePlanSchema,
      response: planBody,
      status: 201,
    },
    async ({ user, body }) => ({ ratePlan: await ratePlanService.createRatePlan(db, user, body, clock()) }),
  );
  api.add(
    {
      method: 'put',
      path: '/rate-plans/:id',
      summary: 'Replace a rate plan',
      tag: 'rates',
      access: SETUP_EDITORS,
      params: idParams,
      body: saveRatePlanSchema,
      response: planBody,
    },
    async ({ user, params, body }) => ({ ratePlan: await ratePlanService.updateRatePlan(db, user, params.id, body) }),
  );
  api.add(
    {
      method: 'delete',
      path: '/rate-plans/:id',
      summary: 'Remove a rate plan no depot uses',
      tag: 'rates',
      access: SETUP_EDITORS,
      params: idParams,
      status: 204,
    },
    async ({ user, params }) => ratePlanService.deleteRatePlan(db, user, params.id),
  );
  api.add(
    {
      method: 'get',
      path: '/rate-plans/:id/preview',
      summary: 'Prices and demand-charge periods of one day',
      tag: 'rates',
      access: EVERY_ROLE,
      params: idParams,
      query: previewQuerySchema,
      response: ratePreviewSchema,
    },
    async ({ user, params, query }) => {
      const plan = await ratePlanService.getRatePlan(db, user, params.id);
      // Clock changes depend on the zone: a depot's the caller may see unless the caller names one.
      const zone = query.timezone ?? (await visibleDepots(db, user))[0]?.timezone ?? 'UTC';
      return previewDay(plan.definition, query.date, zone);
    },
  );
  api.add(
    {
      method: 'post',
      path: '/rate-plans/import-urdb',
      summary: 'Map an OpenEI URDB rate record to a rate plan for review (saves nothing)',
      tag: 'rates',
      access: SETUP_EDITORS,
      body: z.unknown(),
      response: urdbImportResultSchema,
    },
    async ({ body }) => importUrdb(body),
  );
}
