import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { DepotDetail } from '@nightyard/contracts';
import { DEPOT_ID, signedInAs } from '../fleet/fleet-fixtures';
import { DepotListStore } from '../depot-state/depot-list-store';
import { SOUTH_ID, depot, settle, southDepot } from '../testing/fixtures';
import { PLAN_IDS, planDetail, planSummary, answerAsServiceDays } from './plan-fixtures';
import { POLL_MS } from './plan-poll';
import { PlansStore } from './plans-store';

describe('PlansStore', () => {
  let mock: HttpTestingController;
  let store: PlansStore;
  const LIST = `/api/depots/${DEPOT_ID}/plans?serviceDate=2026-12-03`;
  const GENERATING = '00000000-0000-4000-8000-0000000000f9';

  async function tick() {
    TestBed.tick();
    await settle();
    TestBed.tick();
    await settle();
  }

  async function start(plan?: string) {
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting(), PlansStore],
    });
    mock = TestBed.inject(HttpTestingController);
    await signedInAs(mock, ['supervisor']);
    store = TestBed.inject(PlansStore);
    store.bind({ date: signal('2026-12-03'), plan: signal(plan) });
    await tick();
  }

  function answerDepot() {
    mock.expectOne(`/api/depots/${DEPOT_ID}`).flush({
      depot: {
        id: DEPOT_ID,
        chargers: [
          { label: 'C1', maxKw: 60, status: 'in_service' },
          { label: 'C2', maxKw: 30, status: 'out_of_service' },
        ],
      } as DepotDetail,
    });
  }

  afterEach(() => {
    vi.useRealTimers();
    answerAsServiceDays(mock);
    mock.verify();
  });

  it('exposes the night, its versions, the chosen one in full and the chargers, those out marked', async () => {
    await start();
    expect(store.night()).toBe('2026-12-03');
    expect(store.versionsLoading()).toBe(true);
    mock.expectOne(LIST).flush({
      plans: [
        planSummary(),
        planSummary({
          id: PLAN_IDS.published,
          version: 1,
          state: 'published',
          publishedAt: '2026-12-03T19:00:00.000Z',
        }),
      ],
    });
    answerDepot();
    await tick();
    expect(store.versions().map((v) => v.version)).toEqual([2, 1]);
    expect(store.published()?.id).toBe(PLAN_IDS.published);
    // The published version is the one shown when none is asked for.
    expect(store.selectedId()).toBe(PLAN_IDS.published);
    expect(store.chargers()).toEqual([
      { id: 'C1', maxKw: 60, out: false },
      { id: 'C2', maxKw: 30, out: true },
    ]);
    mock
      .expectOne(`/api/plans/${PLAN_IDS.published}`)
      .flush({ plan: planDetail({ id: PLAN_IDS.published, version: 1, state: 'published' }) });
    await tick();
    expect(store.reviewed()?.id).toBe(PLAN_IDS.published);
    expect(store.tz()).toBe('America/Chicago');
    expect(store.versionsLoading()).toBe(false);
    expect(store.problem()).toBeNull();
  });

  it('says why the versions could not be loaded', async () => {
    await start();
    mock
      .expectOne(LIST)
      .flush(
        { error: { code: 'internal', message: 'The plans are unavailable right now' } },
        { status: 503, statusText: 'Unavailable' },
      );
    answerDepot();
    await tick();
    expect(store.versions()).toEqual([]);
    expect(store.problem()).toBe('The plans are unavailable right now');
    expect(store.versionsLoading()).toBe(false);
  });

  it('asks for a generating version every POLL_MS until the engine is done, then stops and says so', async () => {
    vi.useFakeTimers();
    await start(GENERATING);
    const queued = planSummary({
      id: GENERATING,
      version: 3,
      status: 'queued',
      stage: 'Waiting for a worker',
      totalCost: null,
      shortBuses: null,
    });
    mock.expectOne(LIST).flush({ plans: [queued, planSummary()] });
    answerDepot();
    await tick();
    mock.expectOne(`/api/plans/${GENERATING}`).flush({ plan: planDetail({ ...queued, result: null }) });
    await tick();
    expect(store.selected()?.status).toBe('queued');

    // Nothing is asked before the wait is over.
    await vi.advanceTimersByTimeAsync(POLL_MS - 50);
    mock.expectNone(`/api/plans/${GENERATING}`);
    await vi.advanceTimersByTimeAsync(50);
    mock
      .expectOne(`/api/plans/${GENERATING}`)
      .flush({ plan: planDetail({ ...queued, status: 'running', stage: 'Solving', result: null }) });
    await tick();
    expect(store.selected()?.status).toBe('running');
    expect(store.selected()?.stage).toBe('Solving');

    // A failed request is asked again after three waits, not one.
    await vi.advanceTimersByTimeAsync(POLL_MS);
    mock.expectOne(`/api/plans/${GENERATING}`).flush(null, { status: 0, statusText: 'Offline' });
    await vi.advanceTimersByTimeAsync(POLL_MS * 2);
    mock.expectNone(`/api/plans/${GENERATING}`);
    await vi.advanceTimersByTimeAsync(POLL_MS);
    mock.expectOne(`/api/plans/${GENERATING}`).flush({ plan: planDetail({ ...queued, status: 'done', version: 3 }) });
    await tick();
    expect(store.versions().find((v) => v.id === GENERATING)?.status).toBe('done');
    expect(store.reviewed()?.id).toBe(GENERATING);
    expect(store.announcement()).toBe('Version 3 is ready to review.');

    // Done: no more questions.
    await vi.advanceTimersByTimeAsync(POLL_MS * 10);
    mock.expectNone(`/api/plans/${GENERATING}`);
  });

  it('follows a version it started and says when the engine could not make it', async () => {
    vi.useFakeTimers();
    await start();
    mock.expectOne(LIST).flush({ plans: [] });
    answerDepot();
    await tick();
    const generating = store.generate();
    const req = mock.expectOne(`/api/depots/${DEPOT_ID}/plans`);
    expect(req.request.body).toEqual({ serviceDate: '2026-12-03', includeMidday: true });
    const queued = planSummary({ id: GENERATING, version: 1, status: 'queued', totalCost: null, shortBuses: null });
    req.flush({ plan: queued });
    await generating;
    expect(store.versions().map((v) => v.id)).toEqual([GENERATING]);
    expect(store.announcement()).toBe('Version 1 is being generated.');
    // The night's only version is the one shown: read in full once.
    await tick();
    mock.expectOne(`/api/plans/${GENERATING}`).flush({ plan: planDetail({ ...queued, result: null }) });
    await vi.advanceTimersByTimeAsync(POLL_MS);
    mock
      .expectOne(`/api/plans/${GENERATING}`)
      .flush({ plan: planDetail({ ...queued, status: 'failed', error: 'No runs on this day.', result: null }) });
    await tick();
    expect(store.versions()[0]?.status).toBe('failed');
    expect(store.announcement()).toBe('Version 1 could not be generated. No runs on this day.');
    await vi.advanceTimersByTimeAsync(POLL_MS * 5);
    mock.expectNone(`/api/plans/${GENERATING}`);
  });

  /** The draft opened, then publishing it refused with 409 and this error. */
  async function publishRefused(code: string, message: string) {
    await start(PLAN_IDS.draft);
    mock.expectOne(LIST).flush({ plans: [planSummary()] });
    answerDepot();
    await tick();
    mock.expectOne(`/api/plans/${PLAN_IDS.draft}`).flush({ plan: planDetail() });
    await tick();
    const publishing = store.publish(store.selected()!);
    expect(store.busy()).toBe('Publishing version 2');
    mock
      .expectOne(`/api/plans/${PLAN_IDS.draft}/publish`)
      .flush({ error: { code, message } }, { status: 409, statusText: 'Conflict' });
    await publishing;
  }

  it('keeps a refused publish as a conflict, and clears it on reload', async () => {
    await publishRefused('published_meanwhile', 'Version 3 was published meanwhile');
    expect(store.conflict()).toBe('Version 3 was published meanwhile');
    expect(store.problem()).toBeNull();
    expect(store.busy()).toBeNull();

    const reloading = store.reloadAfterConflict(true);
    await settle();
    mock
      .expectOne(LIST)
      .flush({ plans: [planSummary(), planSummary({ id: PLAN_IDS.published, version: 3, state: 'published' })] });
    await settle();
    mock.expectOne(`/api/plans/${PLAN_IDS.draft}`).flush({ plan: planDetail() });
    await reloading;
    expect(store.conflict()).toBeNull();
    expect(store.comparePreferred()).toBe(PLAN_IDS.published);
    expect(store.versions()).toHaveLength(2);
  });

  it('shows any other refused publish as the reason, not as someone else publishing', async () => {
    await publishRefused('conflict', 'The plan is not finished yet: wait until it has been generated');
    expect(store.conflict()).toBeNull();
    expect(store.problem()).toBe('Not published. The plan is not finished yet: wait until it has been generated');
  });

  it("opens a link to a version of another of the person's depots on that depot", async () => {
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting(), PlansStore],
    });
    mock = TestBed.inject(HttpTestingController);
    await signedInAs(mock, ['supervisor']);
    const depots = TestBed.inject(DepotListStore);
    const both = depots.load(true);
    mock.expectOne('/api/depots').flush({ depots: [depot(), southDepot()], chosenDepotId: DEPOT_ID });
    await both;
    store = TestBed.inject(PlansStore);
    store.bind({ date: signal(undefined), plan: signal(PLAN_IDS.published) });
    await tick();
    mock
      .expectOne(`/api/plans/${PLAN_IDS.published}`)
      .flush({ plan: planDetail({ id: PLAN_IDS.published, depotId: SOUTH_ID, state: 'published' }) });
    await tick();
    const put = mock.expectOne('/api/me/depot');
    expect(put.request.body).toEqual({ depotId: SOUTH_ID });
    put.flush({ chosenDepotId: SOUTH_ID });
    await tick();
    expect(depots.current()?.id).toBe(SOUTH_ID);
    expect(store.depot()?.name).toBe('Riverside Depot');
    for (const req of mock.match(() => true)) {
      expect(req.request.url).not.toContain(DEPOT_ID);
      req.flush({ plans: [] });
    }
  });
});
