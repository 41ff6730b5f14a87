import { DISTRICT_READERS, districtOverviewSchema } from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import type { ApiRoutes } from '../http/route';
import { districtOverview } from './district-service';

export function districtRoutes(api: ApiRoutes, { db, clock, costsInputs }: AppDeps) {
  api.add(
    {
      method: 'get',
      path: '/district',
      summary: 'Every depot the caller may see side by side: tonight and the billing period',
      tag: 'district',
      access: DISTRICT_READERS,
      response: districtOverviewSchema,
    },
    async ({ user }) => districtOverview(db, user, clock(), costsInputs),
  );
}
