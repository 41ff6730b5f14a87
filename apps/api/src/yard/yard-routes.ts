import {
  confirmStepSchema,
  depotIdParamsSchema,
  missedStepSchema,
  tonightSchema,
  yardConfirmationSchema,
  yardReportResultSchema,
  yardReportSchema,
  YARD_CREW,
} from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import type { ApiRoutes } from '../http/route';
import { announcePlan, announceReport } from '../live/live-feeds';
import { acknowledgeShift, confirmStep, missedStep, reportProblem, tonight } from './yard-service';

/** The yard carries out the plan; supervisors (and admins) may act for them. */

export function yardRoutes(api: ApiRoutes, deps: AppDeps) {
  const { db } = deps;
  const now = deps.clock;
  api.add(
    {
      method: 'get',
      path: '/depots/:depotId/tonight',
      summary: "Tonight's published plan as yard steps, with reports so far",
      tag: 'yard',
      access: YARD_CREW,
      params: depotIdParamsSchema,
      response: tonightSchema,
    },
    async ({ user, params }) => tonight(db, user, params.depotId, now(), deps.yardNights),
  );
  api.add(
    {
      method: 'post',
      path: '/depots/:depotId/tonight/acknowledge',
      summary: 'Acknowledge the high-voltage cautions for this shift',
      tag: 'yard',
      access: YARD_CREW,
      params: depotIdParamsSchema,
      status: 204,
    },
    async ({ user, params }) => acknowledgeShift(db, user, params.depotId, now()),
  );
  api.add(
    {
      method: 'post',
      path: '/yard/confirmations',
      summary: 'Confirm a plug-in or unplug step, at the time it happened (safe to repeat)',
      tag: 'yard',
      access: YARD_CREW,
      body: confirmStepSchema,
      response: yardConfirmationSchema,
    },
    async ({ user, body }) => confirmStep(db, user, body.planId, body.stepKey, now(), body.at),
  );
  api.add(
    {
      method: 'post',
      path: '/depots/:depotId/tonight/missed',
      summary: 'A step that did not happen: the rest of the night is re-planned and published',
      tag: 'yard',
      access: YARD_CREW,
      params: depotIdParamsSchema,
      body: missedStepSchema,
      response: yardReportResultSchema,
      status: 201,
    },
    async ({ user, params, body }) =>
      missedStep(
        {
          db,
          mailer: deps.mailer,
          publicUrl: deps.auth.publicUrl,
          onPlanPublished: (id) => deps.onPlanPublished?.(id),
        },
        user,
        params.depotId,
        body.planId,
        body.stepKey,
        now(),
      ),
  );
  api.add(
    {
      method: 'post',
      path: '/depots/:depotId/tonight/reports',
      summary: 'Report what differs; the rest of the night is re-planned and published',
      tag: 'yard',
      access: YARD_CREW,
      params: depotIdParamsSchema,
      body: yardReportSchema,
      response: yardReportResultSchema,
      status: 201,
    },
    async ({ user, params, body }) => {
      const result = await reportProblem(
        {
          db,
          mailer: deps.mailer,
          publicUrl: deps.auth.publicUrl,
          onPlanPublished: (id) => deps.onPlanPublished?.(id),
        },
        user,
        params.depotId,
        body,
        now(),
      );
      announceReport(deps.live, params.depotId, user.name, body, now());
      announcePlan(deps.live, result.revision, 'revised', now());
      return result;
    },
  );
}
