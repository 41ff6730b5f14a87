import { and, asc, eq } from 'drizzle-orm';
import { z } from 'zod';
import {
  depotItemParamsSchema,
  planIdParamsSchema,
  planResultSchema,
  SCENARIO_READERS,
  SETUP_EDITORS,
} from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import { chargers, depots, plans } from '../db/schema';
import { DomainError, conflict, notFound } from '../http/errors';
import type { ApiRoutes } from '../http/route';
import { hashPassword } from '../auth/secrets';
import { assertMayOpenDepot, depotOf } from '../depots/depot-access';
import { chargingProfiles } from './charging-profiles';
import { profileNightsOf } from './profile-nights';

const exportSchema = z.array(
  z.object({
    chargerId: z.string(),
    connectorId: z.number().int().optional(),
    evseId: z.number().int().optional(),
    payload: z.record(z.string(), z.unknown()),
  }),
);

export function ocppRoutes(api: ApiRoutes, { db }: AppDeps) {
  api.add(
    {
      method: 'get',
      path: '/plans/:id/ocpp',
      summary: 'The plan as OCPP SetChargingProfile payloads, one per charger',
      tag: 'ocpp',
      access: SCENARIO_READERS,
      params: planIdParamsSchema,
      query: z.strictObject({ version: z.enum(['1.6', '2.0.1'], 'Choose version 1.6 or 2.0.1') }),
      response: exportSchema,
    },
    async ({ user, params, query }) => {
      const [plan] = await db
        .select()
        .from(plans)
        .where(and(eq(plans.id, params.id), eq(plans.organisationId, user.organisationId)));
      if (!plan) throw notFound('That plan');
      assertMayOpenDepot(user, plan.depotId, 'That plan');
      if (plan.state === 'draft' || !plan.result)
        throw conflict('Only a published plan is handed to chargers: publish it first');
      const list = await db
        .select()
        .from(chargers)
        .where(eq(chargers.depotId, plan.depotId))
        .orderBy(asc(chargers.label));
      const used = new Set(planResultSchema.parse(plan.result).sessions.map((s) => s.charger));
      const refs = list
        .filter((c) => used.has(c.label) || c.status === 'in_service')
        .map((c) => ({ label: c.label, connectorId: c.connectorId, evseId: c.evseId }));
      const [depot] = await db
        .select({ id: depots.id, timezone: depots.timezone })
        .from(depots)
        .where(eq(depots.id, plan.depotId));
      // Bound to the plan's night: its id, stack level and validity (see ProfileNight).
      const [night] = await profileNightsOf(db, depot!, [plan.serviceDate]);
      return chargingProfiles(planResultSchema.parse(plan.result), night!, refs, query.version);
    },
  );
  api.add(
    {
      method: 'put',
      path: '/depots/:depotId/chargers/:id/ocpp',
      summary: "Set the charger's OCPP identity, password and connector / EVSE",
      tag: 'ocpp',
      access: SETUP_EDITORS,
      params: depotItemParamsSchema,
      body: z.strictObject({
        identity: z
          .string()
          .regex(/^[A-Za-z0-9*\-_=:+|@.]{1,48}$/, 'Use 1-48 letters, digits or *-_=:+|@. (OCPP identity rules)'),
        password: z.string().min(16, 'Use at least 16 characters').max(40, 'OCPP limits the password to 40 characters'),
        // OCPP ids are 32-bit integers (and so is the column).
        connectorId: z
          .number()
          .int()
          .min(1)
          .max(2 ** 31 - 1, 'Use a connector id up to 2147483647')
          .default(1),
        evseId: z
          .number()
          .int()
          .min(1)
          .max(2 ** 31 - 1, 'Use an EVSE id up to 2147483647')
          .default(1),
      }),
      status: 204,
    },
    async ({ user, params, body }) => {
      await depotOf(db, user, params.depotId);
      const [taken] = await db
        .select({ id: chargers.id, label: chargers.label, organisationId: chargers.organisationId })
        .from(chargers)
        .where(eq(chargers.ocppIdentity, body.identity));
      if (taken && taken.id !== params.id) {
        // Identities are unique across the service (they are the chargers' addresses); one used by
        // another organisation is refused without saying so.
        if (taken.organisationId === user.organisationId) {
          throw new DomainError('conflict', `Charger ${taken.label} of your organisation already has that identity`, {
            identity: 'Already in use',
          });
        }
        throw new DomainError('conflict', 'That OCPP identity cannot be used: choose another', {
          identity: 'Cannot be used',
        });
      }
      const done = await db
        .update(chargers)
        .set({
          ocppIdentity: body.identity,
          ocppPasswordHash: await hashPassword(body.password),
          connectorId: body.connectorId,
          evseId: body.evseId,
        })
        .where(and(eq(chargers.id, params.id), eq(chargers.depotId, params.depotId)))
        .returning({ id: chargers.id });
      if (!done.length) throw notFound('That charger');
    },
  );
}
