import { z } from 'zod';
import {
  assignRatePlanSchema,
  cabinetInputSchema,
  cabinetSchema,
  chargerInputSchema,
  chargerSchema,
  depotDetailSchema,
  depotIdParamsSchema,
  depotItemParamsSchema,
  depotSettingsSchema,
  isoDate,
  loadReductionWindowInputSchema,
  loadReductionWindowSchema,
  peaksSoFarSchema,
  yardCrewSchema,
  EVERY_ROLE,
  SETUP_EDITORS,
} from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import type { ApiRoutes } from '../http/route';
import { assignRatePlan, unassignRatePlan } from '../rates/rate-plans-service';
import * as setup from './depot-setup-service';

export function depotSetupRoutes(api: ApiRoutes, { db, clock }: AppDeps) {
  api.add(
    {
      method: 'get',
      path: '/depots/:depotId',
      summary: 'A depot with its chargers, cabinets, limits and rate plans',
      tag: 'depots',
      access: EVERY_ROLE,
      params: depotIdParamsSchema,
      response: z.object({ depot: depotDetailSchema }),
    },
    async ({ user, params }) => ({ depot: await setup.depotDetail(db, user, params.depotId) }),
  );
  api.add(
    {
      method: 'put',
      path: '/depots/:depotId',
      summary: "Edit the depot's settings",
      tag: 'depots',
      access: SETUP_EDITORS,
      params: depotIdParamsSchema,
      body: depotSettingsSchema,
      response: z.object({ depot: depotDetailSchema }),
    },
    async ({ user, params, body }) => {
      await setup.updateDepotSettings(db, user, params.depotId, body);
      return { depot: await setup.depotDetail(db, user, params.depotId) };
    },
  );
  api.add(
    {
      method: 'post',
      path: '/depots/:depotId/chargers',
      summary: 'Add a charger',
      tag: 'depots',
      access: SETUP_EDITORS,
      params: depotIdParamsSchema,
      body: chargerInputSchema,
      response: z.object({ charger: chargerSchema }),
      status: 201,
    },
    async ({ user, params, body }) => ({ charger: await setup.createCharger(db, user, params.depotId, body, clock()) }),
  );
  api.add(
    {
      method: 'put',
      path: '/depots/:depotId/chargers/:id',
      summary: 'Edit a charger, or put it in or out of service',
      tag: 'depots',
      access: SETUP_EDITORS,
      params: depotItemParamsSchema,
      body: chargerInputSchema,
      response: z.object({ charger: chargerSchema }),
    },
    async ({ user, params, body }) => ({
      charger: await setup.updateCharger(db, user, params.depotId, params.id, body, clock()),
    }),
  );
  api.add(
    {
      method: 'delete',
      path: '/depots/:depotId/chargers/:id',
      summary: 'Remove a charger',
      tag: 'depots',
      access: SETUP_EDITORS,
      params: depotItemParamsSchema,
      status: 204,
    },
    async ({ user, params }) => setup.deleteCharger(db, user, params.depotId, params.id),
  );
  api.add(
    {
      method: 'post',
      path: '/depots/:depotId/cabinets',
      summary: 'Add a power cabinet',
      tag: 'depots',
      access: SETUP_EDITORS,
      params: depotIdParamsSchema,
      body: cabinetInputSchema,
      response: z.object({ cabinet: cabinetSchema }),
      status: 201,
    },
    async ({ user, params, body }) => ({ cabinet: await setup.createCabinet(db, user, params.depotId, body) }),
  );
  api.add(
    {
      method: 'put',
      path: '/depots/:depotId/cabinets/:id',
      summary: 'Edit a power cabinet',
      tag: 'depots',
      access: SETUP_EDITORS,
      params: depotItemParamsSchema,
      body: cabinetInputSchema,
      response: z.object({ cabinet: cabinetSchema }),
    },
    async ({ user, params, body }) => ({
      cabinet: await setup.updateCabinet(db, user, params.depotId, params.id, body),
    }),
  );
  api.add(
    {
      method: 'delete',
      path: '/depots/:depotId/cabinets/:id',
      summary: 'Remove an empty power cabinet',
      tag: 'depots',
      access: SETUP_EDITORS,
      params: depotItemParamsSchema,
      status: 204,
    },
    async ({ user, params }) => setup.deleteCabinet(db, user, params.depotId, params.id),
  );
  api.add(
    {
      method: 'put',
      path: '/depots/:depotId/load-reduction-windows',
      summary: 'Replace the load-reduction windows (all or none)',
      tag: 'depots',
      access: SETUP_EDITORS,
      params: depotIdParamsSchema,
      body: z.strictObject({ windows: z.array(loadReductionWindowInputSchema).max(500) }),
      response: z.object({ windows: z.array(loadReductionWindowSchema) }),
      idempotent: true,
    },
    async ({ user, params, body }) => ({
      windows: await setup.replaceLoadReductionWindows(db, user, params.depotId, body.windows),
    }),
  );
  api.add(
    {
      method: 'put',
      path: '/depots/:depotId/peaks-so-far',
      summary: "Set the billing period's peaks so far",
      tag: 'depots',
      access: SETUP_EDITORS,
      params: depotIdParamsSchema,
      body: peaksSoFarSchema,
      response: z.object({ peaksSoFar: peaksSoFarSchema }),
      idempotent: true,
    },
    async ({ user, params, body }) => ({
      peaksSoFar: await setup.savePeaksSoFar(db, user, params.depotId, body, clock()),
    }),
  );
  api.add(
    {
      method: 'put',
      path: '/depots/:depotId/yard-crew',
      summary: 'Set the yard crew plans keep to: minimum plug-in, driver moves, crew shifts',
      tag: 'depots',
      access: SETUP_EDITORS,
      params: depotIdParamsSchema,
      body: yardCrewSchema,
      response: z.object({ yardCrew: yardCrewSchema }),
      idempotent: true,
    },
    async ({ user, params, body }) => ({ yardCrew: await setup.saveYardCrew(db, user, params.depotId, body) }),
  );
  api.add(
    {
      method: 'post',
      path: '/depots/:depotId/rate-plans',
      summary: 'Bill the depot under a rate plan from a date',
      tag: 'rates',
      access: SETUP_EDITORS,
      params: depotIdParamsSchema,
      body: assignRatePlanSchema,
      status: 204,
      idempotent: true,
    },
    async ({ user, params, body }) => assignRatePlan(db, user, params.depotId, body.ratePlanId, body.effectiveFrom),
  );
  api.add(
    {
      method: 'delete',
      path: '/depots/:depotId/rate-plans/:effectiveFrom',
      summary: 'Remove a rate plan assignment',
      tag: 'rates',
      access: SETUP_EDITORS,
      params: z.strictObject({ depotId: z.uuid('Not a depot id'), effectiveFrom: isoDate() }),
      status: 204,
    },
    async ({ user, params }) => unassignRatePlan(db, user, params.depotId, params.effectiveFrom),
  );
}
