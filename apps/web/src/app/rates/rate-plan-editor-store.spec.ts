import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import { ratePlan } from '../shared/setup-fixtures';
import { settle } from '../testing/fixtures';
import { RatePlanEditorStore } from './rate-plan-editor-store';
import { UrdbDraft } from './urdb-draft';

describe('RatePlanEditorStore', () => {
  let mock: HttpTestingController;
  let store: RatePlanEditorStore;

  async function tick() {
    TestBed.tick();
    await settle();
  }

  function start(id?: string, from?: string) {
    store = TestBed.inject(RatePlanEditorStore);
    store.bind({ id: signal(id), from: signal(from) });
  }

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting(), RatePlanEditorStore],
    });
    mock = TestBed.inject(HttpTestingController);
  });

  afterEach(() => mock.verify());

  it('loads the plan to edit and gives its form, filled', async () => {
    const plan = ratePlan({ name: 'Commercial TOU' });
    start(plan.id);
    await tick();
    expect(store.mode()).toBe('edit');
    expect(store.loading()).toBe(true);
    expect(store.form()).toBeNull();
    mock.expectOne(`/api/rate-plans/${plan.id}`).flush({ ratePlan: plan });
    await tick();
    expect(store.loading()).toBe(false);
    expect(store.plan()?.name).toBe('Commercial TOU');
    expect(store.form()?.controls.name.value).toBe('Commercial TOU');
    expect(store.form()?.controls.seasons.length).toBe(plan.definition.seasons.length);
    expect(store.loadProblem()).toBeNull();
  });

  it('says why the plan could not be loaded', async () => {
    start('00000000-0000-4000-8000-00000000dead');
    await tick();
    mock
      .expectOne('/api/rate-plans/00000000-0000-4000-8000-00000000dead')
      .flush({ error: { code: 'not_found', message: 'No such rate plan' } }, { status: 404, statusText: 'Not Found' });
    await tick();
    expect(store.loadProblem()).toBe('No such rate plan');
    expect(store.form()).toBeNull();
  });

  it('starts from an imported draft, used once, and says when the draft is gone', async () => {
    const plan = ratePlan({ name: 'Prairie Wind' });
    const draft = TestBed.inject(UrdbDraft);
    draft.set({ name: plan.name, definition: plan.definition, notes: ['One tier used.'], fileName: 'urdb.json' });
    start(undefined, 'urdb');
    expect(store.mode()).toBe('import');
    expect(store.notes()).toEqual(['One tier used.']);
    expect(store.fileName()).toBe('urdb.json');
    expect(store.form()?.controls.name.value).toBe('Prairie Wind');
    expect(store.draftLost()).toBe(false);
    TestBed.resetTestingModule();
    expect(draft.value()).toBeNull();

    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting(), RatePlanEditorStore],
    });
    mock = TestBed.inject(HttpTestingController);
    start(undefined, 'urdb');
    expect(store.mode()).toBe('new');
    expect(store.draftLost()).toBe(true);
    expect(store.form()?.controls.name.value).toBe('');
  });

  it('sends nothing with errors in the form; saves a good one and opens it', async () => {
    start();
    const f = store.form()!;
    expect(await store.save(f)).toBe(false);
    expect(store.problem()).toBe('Check the fields marked in red. Nothing was saved.');
    expect(store.problemItems().length).toBeGreaterThan(0);
    mock.expectNone('/api/rate-plans');

    const plan = ratePlan({ name: 'Flat' });
    const good = TestBed.inject(RatePlanEditorStore);
    good.bind({ id: signal(plan.id), from: signal(undefined) });
    await tick();
    mock.expectOne(`/api/rate-plans/${plan.id}`).flush({ ratePlan: plan });
    await tick();
    const navigate = vi.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);
    const saving = good.save(good.form()!);
    expect(good.busy()).toBe(true);
    const req = mock.expectOne(`/api/rate-plans/${plan.id}`);
    expect(req.request.method).toBe('PUT');
    expect(req.request.body.name).toBe('Flat');
    req.flush({ ratePlan: plan });
    expect(await saving).toBe(true);
    expect(good.busy()).toBe(false);
    expect(navigate).toHaveBeenCalledWith(['/rates', plan.id]);
  });
});
