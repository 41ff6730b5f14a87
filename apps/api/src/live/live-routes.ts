import { and, asc, eq, isNotNull } from 'drizzle-orm';
import { depotIdParamsSchema, liveEventSchema, type LiveEvent, EVERY_ROLE } from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import { chargers } from '../db/schema';
import { depotOf } from '../depots/depot-access';
import { DomainError } from '../http/errors';
import type { ApiRoutes } from '../http/route';
import { liveChargerOf } from './live-charger';
import { streamLive } from './live-stream';

export function liveRoutes(api: ApiRoutes, deps: AppDeps) {
  const { db, live } = deps;
  api.add(
    {
      method: 'get',
      path: '/depots/:depotId/live',
      summary:
        "The depot's live events as Server-Sent Events: a snapshot of the chargers, then charger states, plan publications and revisions, yard reports",
      tag: 'live',
      access: EVERY_ROLE,
      params: depotIdParamsSchema,
      eventStream: liveEventSchema,
    },
    async ({ user, params, res }) => {
      await depotOf(db, user, params.depotId);
      if (!live.openStream(user.id)) {
        throw new DomainError(
          'too_many_requests',
          'Too many live connections are open for you: close other tabs or devices showing the depot',
        );
      }
      const snapshot = async (): Promise<LiveEvent> => {
        const rows = await db
          .select({
            id: chargers.id,
            label: chargers.label,
            liveConnected: chargers.liveConnected,
            liveStatus: chargers.liveStatus,
            livePowerW: chargers.livePowerW,
            liveSeenAt: chargers.liveSeenAt,
          })
          .from(chargers)
          .where(
            and(
              eq(chargers.organisationId, user.organisationId),
              eq(chargers.depotId, params.depotId),
              isNotNull(chargers.ocppIdentity),
            ),
          )
          .orderBy(asc(chargers.label));
        return { type: 'snapshot', at: deps.clock().toISOString(), chargers: rows.map(liveChargerOf) };
      };
      await streamLive({ res, bus: live, depotId: params.depotId, userId: user.id, log: deps.log, snapshot });
    },
  );
}
