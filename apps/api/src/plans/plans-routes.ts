import { z } from 'zod';
import {
  adoptedPlanSchema,
  depotIdParamsSchema,
  isoDate,
  generatePlanSchema,
  planComparisonSchema,
  planDetailSchema,
  planIdParamsSchema,
  planSummarySchema,
  publishPlanSchema,
  whatIfAdoptionSchema,
  EVERY_ROLE,
  PLANNERS,
} from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import type { ApiRoutes } from '../http/route';
import * as plans from './plans-service';
import { adoptWhatIf, whatIfAdoption } from './what-if-adoption';
import { announcePlan } from '../live/live-feeds';

/** Supervisors generate and publish plans (admins may too); every role reads them. */
const planBody = z.object({ plan: planSummarySchema });

export function plansRoutes(api: ApiRoutes, deps: AppDeps) {
  const { db, jobs, mailer, auth } = deps;
  api.add(
    {
      method: 'get',
      path: '/depots/:depotId/plans',
      summary: 'Plan versions of the depot, newest first',
      tag: 'plans',
      access: EVERY_ROLE,
      params: depotIdParamsSchema,
      query: z.strictObject({ serviceDate: isoDate().optional() }),
      response: z.object({ plans: z.array(planSummarySchema) }),
    },
    async ({ user, params, query }) => ({ plans: await plans.listPlans(db, user, params.depotId, query.serviceDate) }),
  );
  api.add(
    {
      method: 'post',
      path: '/depots/:depotId/plans',
      summary: 'Generate a plan for a night in the background',
      tag: 'plans',
      access: PLANNERS,
      params: depotIdParamsSchema,
      body: generatePlanSchema,
      response: planBody,
      status: 202,
    },
    async ({ user, params, body }) => ({
      plan: await plans.generatePlan(
        db,
        jobs,
        user,
        params.depotId,
        body.serviceDate,
        body.includeMidday,
        deps.clock(),
      ),
    }),
  );
  api.add(
    {
      method: 'post',
      path: '/depots/:depotId/plans/what-if',
      summary: 'Plan an uploaded scenario file as a what-if (a study: never published; adopt it instead)',
      tag: 'plans',
      access: PLANNERS,
      params: depotIdParamsSchema,
      body: z.unknown(),
      response: planBody,
      status: 202,
    },
    async ({ user, params, body }) => ({
      plan: await plans.createWhatIf(db, jobs, user, params.depotId, body, deps.clock()),
    }),
  );
  api.add(
    {
      method: 'get',
      path: '/plans/:id',
      summary: 'A plan with its result',
      tag: 'plans',
      access: EVERY_ROLE,
      params: planIdParamsSchema,
      response: z.object({ plan: planDetailSchema }),
    },
    async ({ user, params }) => ({ plan: await plans.getPlan(db, user, params.id) }),
  );
  api.add(
    {
      method: 'get',
      path: '/plans/:id/scenario',
      summary: "Download the plan's scenario file (its input snapshot)",
      tag: 'plans',
      access: PLANNERS,
      params: planIdParamsSchema,
    },
    async ({ user, params, res }) => {
      const file = await plans.planScenarioFile(db, user, params.id);
      res.setHeader('Content-Disposition', `attachment; filename="${file.name}"`);
      res.json(file.scenario);
    },
  );
  api.add(
    {
      method: 'get',
      path: '/plans/:id/compare',
      summary: 'Which buses moved against another version',
      tag: 'plans',
      access: EVERY_ROLE,
      params: planIdParamsSchema,
      query: z.strictObject({ with: z.uuid('Not a plan id') }),
      response: planComparisonSchema,
    },
    async ({ user, params, query }) => plans.comparePlans(db, user, params.id, query.with),
  );
  api.add(
    {
      method: 'get',
      path: '/plans/:id/adoption',
      summary: 'What adopting a what-if would change: the study re-checked against the depot now',
      tag: 'plans',
      access: PLANNERS,
      params: planIdParamsSchema,
      response: whatIfAdoptionSchema,
    },
    async ({ user, params }) => whatIfAdoption(db, user, params.id, deps.clock()),
  );
  api.add(
    {
      method: 'post',
      path: '/plans/:id/adopt',
      summary: 'Adopt a what-if: a new draft generated from the depot as it is now, with the differences',
      tag: 'plans',
      access: PLANNERS,
      params: planIdParamsSchema,
      response: adoptedPlanSchema,
      status: 202,
    },
    async ({ user, params }) => adoptWhatIf(db, jobs, user, params.id, deps.clock()),
  );
  api.add(
    {
      method: 'post',
      path: '/plans/:id/publish',
      summary: 'Publish a finished draft to the yard (a what-if is refused with 409: adopt it)',
      tag: 'plans',
      access: PLANNERS,
      params: planIdParamsSchema,
      body: publishPlanSchema,
      response: planBody,
    },
    async ({ user, params, body }) => {
      const plan = await plans.publishPlan(
        db,
        mailer,
        user,
        params.id,
        body.expectedPublishedId,
        auth.publicUrl,
        deps.clock(),
      );
      deps.onPlanPublished?.(plan.id);
      announcePlan(deps.live, plan, 'published', deps.clock());
      return { plan };
    },
  );
}
