import type { TestUser, createTestApp } from './test-app';

type App = ReturnType<typeof createTestApp>;

/** Asks for a night's plan and waits until the background job has finished it. */
export async function generatedPlan(app: App, user: TestUser, depotId: string, serviceDate: string, includeMidday = false) {
  const res = await app.request().post(`/api/depots/${depotId}/plans`).set({ Authorization: `Bearer ${user.token}` })
    .send({ serviceDate, includeMidday }).expect(202);
  for (let i = 0; i < 300; i++) {
    const plan = (await app.request().get(`/api/plans/${res.body.plan.id}`).set({ Authorization: `Bearer ${user.token}` }).expect(200)).body.plan;
    if (plan.status === 'done' || plan.status === 'failed') return plan;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('The plan did not finish in 30 s');
}

/** Generates and publishes a night's plan; returns its id. */
export async function publishedPlan(app: App, user: TestUser, depotId: string, serviceDate: string): Promise<string> {
  const plan = await generatedPlan(app, user, depotId, serviceDate);
  await app.request().post(`/api/plans/${plan.id}/publish`).set({ Authorization: `Bearer ${user.token}` })
    .send({ expectedPublishedId: null }).expect(200);
  return plan.id;
}
