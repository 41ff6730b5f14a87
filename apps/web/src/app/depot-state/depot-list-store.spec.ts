import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { NORTH_ID, SOUTH_ID, depot, settle, southDepot } from '../testing/fixtures';
import { DepotListStore } from './depot-list-store';

describe('DepotListStore', () => {
  let store: DepotListStore;
  let mock: HttpTestingController;

  beforeEach(() => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    store = TestBed.inject(DepotListStore);
    mock = TestBed.inject(HttpTestingController);
  });
  afterEach(() => mock.verify());

  async function loaded(chosenDepotId: string | null): Promise<void> {
    const loading = store.load();
    mock.expectOne('/api/depots').flush({ depots: [depot(), southDepot()], chosenDepotId });
    await loading;
  }

  it('works on the depot the person chose last', async () => {
    await loaded(SOUTH_ID);
    expect(store.current()?.name).toBe('Riverside Depot');
  });

  it('refreshes the counts in place, keeping the list shown and the choice, and keeps it when the API fails', async () => {
    await loaded(SOUTH_ID);
    const refreshing = store.refresh();
    expect(store.state()).toBe('loaded');
    const base = depot().nextServiceDay!;
    mock.expectOne('/api/depots').flush({
      depots: [depot({ nextServiceDay: { ...base, absentBuses: ['220'] } }), southDepot()],
      chosenDepotId: null,
    });
    await refreshing;
    expect(store.current()?.name).toBe('Riverside Depot');
    expect(store.depots()[0]!.nextServiceDay!.absentBuses).toEqual(['220']);
    const failing = store.refresh();
    mock.expectOne('/api/depots').flush('down', { status: 503, statusText: 'Service Unavailable' });
    await failing;
    expect(store.state()).toBe('loaded');
    expect(store.depots()).toHaveLength(2);
  });

  it('takes the first depot until one is chosen, and when the chosen one is no longer theirs', async () => {
    await loaded(null);
    expect(store.current()?.id).toBe(NORTH_ID);
    const again = store.load(true);
    mock.expectOne('/api/depots').flush({ depots: [depot()], chosenDepotId: SOUTH_ID });
    await again;
    expect(store.current()?.id).toBe(NORTH_ID);
  });

  it('switches at once and has the API remember the choice', async () => {
    await loaded(NORTH_ID);
    const choosing = store.choose(SOUTH_ID);
    expect(store.current()?.id).toBe(SOUTH_ID);
    expect(store.switches()).toBe(1);
    const put = mock.expectOne('/api/me/depot');
    expect(put.request.method).toBe('PUT');
    expect(put.request.body).toEqual({ depotId: SOUTH_ID });
    put.flush({ chosenDepotId: SOUTH_ID });
    expect(await choosing).toBe(true);
    expect(store.current()?.id).toBe(SOUTH_ID);
    expect(store.choiceProblem()).toBeNull();
  });

  it('goes back to the depot before, with a message, when the API refuses the choice', async () => {
    await loaded(NORTH_ID);
    const choosing = store.choose(SOUTH_ID);
    expect(store.current()?.id).toBe(SOUTH_ID);
    mock
      .expectOne('/api/me/depot')
      .flush(
        { error: { code: 'not_found', message: 'No such depot among yours.' } },
        { status: 404, statusText: 'Not Found' },
      );
    expect(await choosing).toBe(false);
    expect(store.current()?.id).toBe(NORTH_ID);
    expect(store.choiceProblem()).toBe('Could not switch to Riverside Depot. No such depot among yours.');
    expect(store.switches()).toBe(2);
  });

  it('keeps a later choice when an earlier one fails after it', async () => {
    await loaded(NORTH_ID);
    const first = store.choose(SOUTH_ID);
    const second = store.choose(NORTH_ID);
    const [a, b] = mock.match('/api/me/depot');
    b!.flush({ chosenDepotId: NORTH_ID });
    a!.flush({ error: { code: 'unavailable', message: 'Down.' } }, { status: 503, statusText: 'Unavailable' });
    await Promise.all([first, second]);
    expect(store.current()?.id).toBe(NORTH_ID);
    expect(store.choiceProblem()).toBeNull();
  });

  it('keeps a choice made while the list was on its way over the remembered one', async () => {
    await loaded(NORTH_ID);
    const again = store.load(true);
    void store.choose(SOUTH_ID);
    mock.expectOne('/api/depots').flush({ depots: [depot(), southDepot()], chosenDepotId: NORTH_ID });
    await again;
    expect(store.current()?.id).toBe(SOUTH_ID);
    mock.expectOne('/api/me/depot').flush({ chosenDepotId: SOUTH_ID });
    await settle();
  });

  it('refuses a depot not in the list without asking the API', async () => {
    await loaded(NORTH_ID);
    expect(await store.choose('00000000-0000-4000-8000-0000000000ff')).toBe(false);
    mock.expectNone('/api/me/depot');
    expect(store.current()?.id).toBe(NORTH_ID);
  });
});
