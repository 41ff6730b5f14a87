import { z } from 'zod';
import {
  busInputSchema,
  busSchema,
  copyServiceDaySchema,
  csvUploadSchema,
  depotIdParamsSchema,
  depotItemParamsSchema,
  serviceDayInputSchema,
  serviceDayParamsSchema,
  serviceDaySchema,
  coldWeatherTableSchema,
  forecastLowFSchema,
  EVERY_ROLE,
  FLEET_EDITORS,
  PLAN_READERS,
} from '@nightyard/contracts';
import { eq } from 'drizzle-orm';
import type { AppDeps } from '../app-deps';
import { depots } from '../db/schema';
import type { ApiRoutes } from '../http/route';
import { depotOf } from '../depots/depot-access';
import { createBus, listBuses, updateBus } from './buses-service';
import { MAX_RUNS_CSV_BYTES, refuseLargerThan } from '../http/limits';
import { runInPool } from '../workers/pool';
import { csvField, runsCsvTemplate } from './runs-csv';
import { copyServiceDay, getServiceDay, replaceServiceDay } from './service-day-service';

/** Supervisors keep the fleet and the runs; admins may too. Facilities and finance read. */

export function fleetRoutes(api: ApiRoutes, { db }: AppDeps) {
  api.add(
    {
      method: 'get',
      path: '/depots/:depotId/buses',
      summary: "The depot's buses",
      tag: 'fleet',
      access: EVERY_ROLE,
      params: depotIdParamsSchema,
      response: z.object({ buses: z.array(busSchema) }),
    },
    async ({ user, params }) => ({ buses: await listBuses(db, user, params.depotId) }),
  );
  api.add(
    {
      method: 'post',
      path: '/depots/:depotId/buses',
      summary: 'Add a bus',
      tag: 'fleet',
      access: FLEET_EDITORS,
      params: depotIdParamsSchema,
      body: busInputSchema,
      response: z.object({ bus: busSchema }),
      status: 201,
    },
    async ({ user, params, body }) => ({ bus: await createBus(db, user, params.depotId, body) }),
  );
  api.add(
    {
      method: 'put',
      path: '/depots/:depotId/buses/:id',
      summary: 'Edit a bus',
      tag: 'fleet',
      access: FLEET_EDITORS,
      params: depotItemParamsSchema,
      body: busInputSchema,
      response: z.object({ bus: busSchema }),
    },
    async ({ user, params, body }) => ({ bus: await updateBus(db, user, params.depotId, params.id, body) }),
  );
  api.add(
    {
      method: 'get',
      path: '/depots/:depotId/cold-weather',
      summary: 'The cold-weather factors on energy per mile',
      tag: 'fleet',
      access: PLAN_READERS,
      params: depotIdParamsSchema,
      response: z.object({ bands: coldWeatherTableSchema }),
    },
    async ({ user, params }) => ({ bands: (await depotOf(db, user, params.depotId)).coldWeatherFactors }),
  );
  api.add(
    {
      method: 'put',
      path: '/depots/:depotId/cold-weather',
      summary: 'Edit the cold-weather factors',
      tag: 'fleet',
      access: FLEET_EDITORS,
      params: depotIdParamsSchema,
      body: z.strictObject({ bands: coldWeatherTableSchema }),
      idempotent: true,
      response: z.object({ bands: coldWeatherTableSchema }),
    },
    async ({ user, params, body }) => {
      await depotOf(db, user, params.depotId);
      await db.update(depots).set({ coldWeatherFactors: body.bands }).where(eq(depots.id, params.depotId));
      return { bands: body.bands };
    },
  );
  api.add(
    {
      method: 'get',
      path: '/depots/:depotId/service-days/:date',
      summary: "A service day's runs and arrival states of charge",
      tag: 'fleet',
      access: PLAN_READERS,
      params: serviceDayParamsSchema,
      response: serviceDaySchema,
    },
    async ({ user, params }) => getServiceDay(db, user, params.depotId, params.date),
  );
  api.add(
    {
      method: 'put',
      path: '/depots/:depotId/service-days/:date',
      summary: "Replace a service day's runs (all rows or none)",
      tag: 'fleet',
      access: FLEET_EDITORS,
      params: serviceDayParamsSchema,
      body: serviceDayInputSchema,
      response: serviceDaySchema,
      idempotent: true,
    },
    async ({ user, params, body }) => replaceServiceDay(db, user, params.depotId, params.date, body, 'typed'),
  );
  api.add(
    {
      method: 'post',
      path: '/depots/:depotId/service-days/:date/copy',
      summary: 'Copy the runs of a previous day',
      tag: 'fleet',
      access: FLEET_EDITORS,
      params: serviceDayParamsSchema,
      body: copyServiceDaySchema,
      response: serviceDaySchema,
      idempotent: true,
    },
    async ({ user, params, body }) =>
      copyServiceDay(db, user, params.depotId, params.date, body.fromDate, body.replace),
  );
  api.add(
    {
      method: 'post',
      path: '/depots/:depotId/service-days/:date/csv',
      summary: "Upload a day's runs as CSV (all rows or none)",
      tag: 'fleet',
      access: FLEET_EDITORS,
      params: serviceDayParamsSchema,
      body: csvUploadSchema.extend({ forecastLowF: forecastLowFSchema.nullable().default(null) }),
      response: serviceDaySchema,
      idempotent: true,
    },
    async ({ user, params, body }) => {
      refuseLargerThan(body.csv, MAX_RUNS_CSV_BYTES, 'The runs file', 'csv');
      const { runs, lines, problems } = await runInPool({ kind: 'runs-csv', text: body.csv, date: params.date });
      // The file's own problems and the fleet's (unknown buses, overlaps) are named together.
      return replaceServiceDay(
        db,
        user,
        params.depotId,
        params.date,
        { forecastLowF: body.forecastLowF, runs },
        'uploaded',
        (i, field) => `line ${lines[i]}.${csvField(field)}`,
        undefined,
        { earlier: problems, rowName: (i) => `line ${lines[i]}` },
      );
    },
  );
  api.add(
    {
      method: 'get',
      path: '/depots/:depotId/service-days/:date/csv-template',
      summary: "A CSV template for a day's runs",
      tag: 'fleet',
      access: PLAN_READERS,
      params: serviceDayParamsSchema,
    },
    async ({ user, params, res }) => {
      // The example rows name a bus of this depot, so a template filled in as shown uploads.
      const fleet = await listBuses(db, user, params.depotId);
      res.setHeader('Content-Type', 'text/csv; charset=utf-8');
      res.setHeader('Content-Disposition', `attachment; filename="runs-${params.date}.csv"`);
      res.send(runsCsvTemplate(fleet.find((b) => b.status === 'active')?.number ?? fleet[0]?.number));
    },
  );
}
