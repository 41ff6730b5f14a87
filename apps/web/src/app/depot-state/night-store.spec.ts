import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { Clock } from '../core/clock';
import { depotNight, settle } from '../testing/fixtures';
import { NightStore } from './night-store';

const DEPOT = { id: '00000000-0000-4000-8000-0000000000d1', timezone: 'America/Chicago' };
const URL = `/api/depots/${DEPOT.id}/night`;

describe('NightStore', () => {
  let store: NightStore;
  let clock: Clock;
  let mock: HttpTestingController;

  beforeEach(() => {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    store = TestBed.inject(NightStore);
    clock = TestBed.inject(Clock);
    mock = TestBed.inject(HttpTestingController);
  });
  afterEach(() => mock.verify());

  it('takes tonight from the server and asks once while that night lasts', async () => {
    const now = '2026-12-02T07:30:00.000Z'; // 01:30 at the depot
    clock.setServerTime(Date.parse(now));
    expect(store.tonightOf(DEPOT)).toBeNull();
    const loading = store.load(DEPOT);
    void store.load(DEPOT);
    mock.expectOne(URL).flush(depotNight('2026-12-01', now));
    await loading;
    expect(store.tonightOf(DEPOT)).toBe('2026-12-01');
    expect(store.night()?.inForce?.serviceDate).toBe('2026-12-01');
    await store.load(DEPOT);
    mock.expectNone(URL);
  });

  it('asks again once the night is over, and the next night becomes tonight', async () => {
    clock.setServerTime(Date.parse('2026-12-02T07:30:00.000Z'));
    const loading = store.load(DEPOT);
    mock.expectOne(URL).flush(depotNight('2026-12-01', '2026-12-02T07:30:00.000Z'));
    await loading;
    // 06:31 at the depot: the night of 1 December ended at 06:30.
    const later = '2026-12-02T12:31:00.000Z';
    clock.setServerTime(Date.parse(later));
    TestBed.tick();
    mock.expectOne(URL).flush(depotNight('2026-12-02', later));
    await settle();
    expect(store.tonightOf(DEPOT)).toBe('2026-12-02');
    TestBed.tick();
    mock.expectNone(URL);
  });

  it("keeps pages usable with the depot's date when the API cannot say", async () => {
    clock.setServerTime(Date.parse('2026-12-02T07:30:00.000Z'));
    const loading = store.load(DEPOT);
    mock
      .expectOne(URL)
      .flush({ error: { code: 'internal', message: 'Down' } }, { status: 500, statusText: 'Server Error' });
    await loading;
    expect(store.state()).toBe('failed');
    expect(store.tonightOf(DEPOT)).toBe('2026-12-02');
  });
});
