import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { settle } from '../testing/fixtures';
import { DEPOT_ID, bus, run, serviceDay, signedInAs } from './fleet-fixtures';
import { ServiceDayStore } from './service-day-store';

const DAY = `/api/depots/${DEPOT_ID}/service-days/2026-12-07`;

describe('ServiceDayStore', () => {
  let mock: HttpTestingController;
  let store: ServiceDayStore;

  async function tick() {
    TestBed.tick();
    await settle();
    TestBed.tick();
    await settle();
  }

  async function start() {
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting(), ServiceDayStore],
    });
    mock = TestBed.inject(HttpTestingController);
    await signedInAs(mock, ['supervisor']);
    store = TestBed.inject(ServiceDayStore);
    store.bind(signal('2026-12-07'));
    await tick();
  }

  function answerFleet() {
    mock.expectOne(`/api/depots/${DEPOT_ID}/buses`).flush({
      buses: [
        bus({ id: '00000000-0000-4000-8000-0000000000b3', number: '210' }),
        bus(),
        bus({ id: '00000000-0000-4000-8000-0000000000b2', number: '33' }),
      ],
    });
    mock.expectOne(`/api/depots/${DEPOT_ID}/cold-weather`).flush({
      bands: [
        { belowF: 32, factor: 1.25 },
        { belowF: 10, factor: 1.4 },
      ],
    });
  }

  afterEach(() => mock.verify());

  it('exposes the day, its runs in the form, the buses in number order and the factor for the forecast low', async () => {
    await start();
    expect(store.loading()).toBe(true);
    // A Monday: copies come from the Friday before.
    expect(store.copyFrom.value).toBe('2026-12-04');
    mock.expectOne(DAY).flush(
      serviceDay({
        date: '2026-12-07',
        forecastLowF: 20,
        runs: [run(), run({ id: '00000000-0000-4000-8000-0000000000e2' })],
      }),
    );
    answerFleet();
    await tick();
    expect(store.loading()).toBe(false);
    expect(store.loadProblem()).toBeNull();
    expect(store.serviceDay()?.runs).toHaveLength(2);
    expect(store.form.controls.runs.length).toBe(2);
    expect(store.form.pristine).toBe(true);
    expect(store.busNumbers()).toEqual(['33', '201', '210']);
    expect(store.factor()).toBe(1.25);
    store.form.controls.forecastLowF.setValue(5);
    expect(store.factor()).toBe(1.4);
  });

  it('says why the day could not be loaded, and asks again on reload', async () => {
    await start();
    mock
      .expectOne(DAY)
      .flush(
        { error: { code: 'unavailable', message: 'The database is not answering' } },
        { status: 503, statusText: 'Unavailable' },
      );
    answerFleet();
    await tick();
    expect(store.loading()).toBe(false);
    expect(store.loadProblem()).toBe('The database is not answering');
    store.reload();
    await tick();
    expect(store.loading()).toBe(true);
    mock.expectOne(DAY).flush(serviceDay({ date: '2026-12-07', runs: [] }));
    await tick();
    expect(store.loadProblem()).toBeNull();
    expect(store.serviceDay()?.runs).toEqual([]);
  });

  it('sends nothing while a row has errors, then saves and shows the day as the API answers', async () => {
    await start();
    mock.expectOne(DAY).flush(serviceDay({ date: '2026-12-07', runs: [] }));
    answerFleet();
    await tick();
    store.addRun();
    expect(await store.save()).toBe(false);
    expect(store.problem()).toBe('Some values need fixing (marked in the table); nothing was saved.');
    mock.expectNone(DAY);

    store.form.controls.runs.at(0).patchValue({ busNumber: '201', pullOut: '14:05', pullIn: '16:30', miles: 30 });
    const saving = store.save();
    expect(store.busy()).toBe('Saving the runs');
    const req = mock.expectOne(DAY);
    expect(req.request.method).toBe('PUT');
    expect(req.request.body.runs[0]).toMatchObject({
      busNumber: '201',
      pullOut: '2026-12-07T14:05',
      pullIn: '2026-12-07T16:30',
      miles: 30,
    });
    req.flush(
      serviceDay({ date: '2026-12-07', runs: [run({ pullOut: '2026-12-07T14:05', pullIn: '2026-12-07T16:30' })] }),
    );
    expect(await saving).toBe(true);
    expect(store.busy()).toBeNull();
    expect(store.problem()).toBeNull();
    expect(store.serviceDay()?.runs).toHaveLength(1);
    expect(store.form.dirty).toBe(false);
  });

  it('asks before a copy replaces the runs of the day, and copies only when told to', async () => {
    await start();
    mock.expectOne(DAY).flush(serviceDay({ date: '2026-12-07' }));
    answerFleet();
    await tick();
    const ask = vi.fn().mockResolvedValue(true);
    const copying = store.copy(ask);
    mock
      .expectOne((r) => r.url === `${DAY}/copy` && r.body.replace === false)
      .flush(
        { error: { code: 'conflict', message: 'Monday 7 December 2026 already has 1 run' } },
        { status: 409, statusText: 'Conflict' },
      );
    await settle();
    expect(ask).toHaveBeenCalledWith({ from: '2026-12-04', message: 'Monday 7 December 2026 already has 1 run' });
    mock
      .expectOne((r) => r.url === `${DAY}/copy` && r.body.replace === true)
      .flush(serviceDay({ date: '2026-12-07', runs: [] }));
    await copying;
    expect(store.serviceDay()?.runs).toEqual([]);
    expect(store.busy()).toBeNull();
  });
});
