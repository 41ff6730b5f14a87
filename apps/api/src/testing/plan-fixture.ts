import { vi } from 'vitest';
import type { TestUser, createTestApp } from './test-app';

type App = ReturnType<typeof createTestApp>;

/** Asks for a night's plan and waits until the background job has finished it. */
export async function generatedPlan(
  app: App,
  user: TestUser,
  depotId: string,
  serviceDate: string,
  includeMidday = false,
) {
  const res = await app
    .request()
    .post(`/api/depots/${depotId}/plans`)
    .set({ Authorization: `Bearer ${user.token}` })
    .send({ serviceDate, includeMidday })
    .expect(202);
  return vi.waitFor(
    async () => {
      const plan = (
        await app
          .request()
          .get(`/api/plans/${res.body.plan.id}`)
          .set({ Authorization: `Bearer ${user.token}` })
          .expect(200)
      ).body.plan;
      if (plan.status !== 'done' && plan.status !== 'failed') throw new Error(`The plan is still ${plan.status}`);
      return plan;
    },
    { timeout: 30_000, interval: 100 },
  );
}

/** Generates and publishes a night's plan; returns its id. */
export async function publishedPlan(app: App, user: TestUser, depotId: string, serviceDate: string): Promise<string> {
  const plan = await generatedPlan(app, user, depotId, serviceDate);
  await app
    .request()
    .post(`/api/plans/${plan.id}/publish`)
    .set({ Authorization: `Bearer ${user.token}` })
    .send({ expectedPublishedId: null })
    .expect(200);
  return plan.id;
}

/** Energy (kWh) each bus takes from the plan's sessions before `cut` (ms). */
export function deliveredBefore(
  result: { sessions: { bus: string; start: string; kw: number[] }[] },
  cut: number,
): Record<string, number> {
  const out: Record<string, number> = {};
  for (const s of result.sessions) {
    s.kw.forEach((kw, k) => {
      if (Date.parse(s.start) + k * 900_000 < cut) out[s.bus] = (out[s.bus] ?? 0) + kw * 0.25;
    });
  }
  return out;
}
