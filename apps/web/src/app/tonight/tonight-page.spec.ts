import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { computed, signal } from '@angular/core';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { Charger, PlanDetail, PlanSummary, Role } from '@nightyard/contracts';
import { AuthStore } from '../auth/auth-store';
import { DepotListStore } from '../depot-state/depot-list-store';
import { DEPOT_ID } from '../fleet/fleet-fixtures';
import { PLAN_IDS, planDetail, planSummary } from '../plans/plan-fixtures';
import { Clock } from '../core/clock';
import { depot, depotNight, settle } from '../testing/fixtures';
import { FakeLiveTransport, provideFakeLive } from '../testing/live-fake';
import { charger } from '../yard/yard-fixtures';
import { TonightPage } from './tonight-page';

describe('TonightPage', () => {
  let fixture: ComponentFixture<TonightPage>;
  let el: HTMLElement;
  let mock: HttpTestingController;

  const text = (node: Element | null) => node?.textContent?.replace(/\s+/g, ' ').trim() ?? '';
  /** The words a screen reader gets: the text without the (aria-hidden) icons. */
  const words = (node: Element | null) => {
    const copy = node?.cloneNode(true) as Element | undefined;
    copy?.querySelectorAll('mat-icon').forEach((i) => i.remove());
    return text(copy ?? null);
  };
  const fact = (name: string) => text(el.querySelector(`[data-fact="${name}"]`));

  async function render(): Promise<void> {
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
    await settle();
  }

  /** The server's time: 22:00 on Tuesday 1 December at the depot (America/Chicago, UTC-6). */
  let serverNow = '2026-12-02T04:00:00.000Z';
  /** Tonight as the server says (the night endpoint). */
  let tonight = '2026-12-01';

  /** How often the page asked for the depot card's counts again. */
  let depotRefreshes = 0;

  async function start(roles: Role[] = ['admin'], serviceLimitKw?: number): Promise<void> {
    depotRefreshes = 0;
    const current = signal(
      depot({
        id: DEPOT_ID,
        name: 'Orchard Lane Depot',
        timezone: 'America/Chicago',
        ...(serviceLimitKw === undefined ? {} : { serviceLimitKw }),
      }),
    );
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(),
        provideHttpClientTesting(),
        provideFakeLive(),
        { provide: AuthStore, useValue: { roles: signal(roles) } },
        {
          provide: DepotListStore,
          useValue: {
            load: () => Promise.resolve(),
            refresh: () => {
              depotRefreshes++;
              return Promise.resolve();
            },
            state: signal('loaded'),
            error: signal(null),
            current: computed(() => current()),
          },
        },
      ],
    });
    mock = TestBed.inject(HttpTestingController);
    TestBed.inject(Clock).setServerTime(Date.parse(serverNow));
    fixture = TestBed.createComponent(TonightPage);
    el = fixture.nativeElement;
    await render();
    mock.expectOne(`/api/depots/${DEPOT_ID}/night`).flush(depotNight(tonight, serverNow));
    await render();
  }

  /** Answers the plan list of one night (the page asks night by night, newest first). */
  async function night(date: string, plans: PlanSummary[]): Promise<void> {
    mock
      .expectOne((r) => r.url === `/api/depots/${DEPOT_ID}/plans` && r.params.get('serviceDate') === date)
      .flush({ plans });
    await render();
  }

  async function chargers(list: Charger[]): Promise<void> {
    mock.expectOne(`/api/depots/${DEPOT_ID}`).flush({ depot: { id: DEPOT_ID, chargers: list } });
    await render();
  }

  async function detail(plan: PlanDetail): Promise<void> {
    mock.expectOne(`/api/plans/${plan.id}`).flush({ plan });
    await render();
  }

  beforeEach(() => {
    serverNow = '2026-12-02T04:00:00.000Z';
    tonight = '2026-12-01';
  });
  afterEach(() => mock.verify());

  it("looks from the server's tonight after midnight, not from the depot's calendar date", async () => {
    // 01:30 on Wednesday 2 December at the depot: the night of Tuesday 1 December is still under way.
    serverNow = '2026-12-02T07:30:00.000Z';
    await start();
    await chargers([]);
    await night('2026-12-01', [planSummary({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published' })]);
    await detail(planDetail({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published' }));
    expect(fact('night')).toContain('1');
    expect(fact('night')).toContain('December');
    expect(el.querySelector('[data-fact="not-tonight"]')).toBeNull();
  });

  it('says when the plan shown is of an earlier night than tonight', async () => {
    tonight = '2026-12-02';
    serverNow = '2026-12-02T21:00:00.000Z';
    await start();
    await chargers([]);
    await night('2026-12-02', []);
    await night('2026-12-01', [planSummary({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published' })]);
    await detail(planDetail({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published' }));
    expect(fact('not-tonight')).toContain('No plan is published for tonight');
    expect(fact('not-tonight')).toContain('2');
  });

  it("warns when the depot's service limit was lowered below the published plan's peak", async () => {
    // The plan peaks at 120 kW under a 150 kW limit; the Depot now says 90 kW.
    await start(['admin'], 90);
    await chargers([charger('C1')]);
    await night('2026-12-01', [planSummary({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published' })]);
    await detail(planDetail({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published' }));
    expect(fact('peak')).toContain('120 kW of 150 kW limit');
    expect(fact('limit-lowered')).toBe(
      "warning The service limit is now 90 kW, below this plan's peak (it was made under 150 kW). Generate the night again under Plans so it keeps to the new limit.",
    );
  });

  it("says when buses' runs changed since the published plan was made", async () => {
    await start();
    await chargers([charger('C1')]);
    await night('2026-12-01', [planSummary({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published' })]);
    await detail(
      planDetail({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published', runsChanged: ['201'] }),
    );
    expect(fact('runs-changed')).toBe(
      'update The runs of bus 201 changed since this plan was made (their times, or the energy they need): it may not serve them. Generate the night again under Plans and publish it.',
    );
  });

  it('says nothing of a lowered limit the plan keeps to', async () => {
    await start(['admin'], 130);
    await chargers([charger('C1')]);
    await night('2026-12-01', [planSummary({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published' })]);
    await detail(planDetail({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published' }));
    expect(fact('peak')).toContain('120 kW of 150 kW limit');
    expect(el.querySelector('[data-fact="limit-lowered"]')).toBeNull();
  });

  it('walks back from today to the latest night with a published plan and shows it', async () => {
    await start();
    expect(text(el.querySelector('h1'))).toBe('Tonight');
    expect(text(el)).toContain('Orchard Lane Depot');
    await chargers([charger('C1')]);
    await night('2026-12-01', [planSummary({ serviceDate: '2026-12-01', state: 'draft' })]);
    await night('2026-11-30', []);
    const published = planDetail({
      id: PLAN_IDS.published,
      serviceDate: '2026-11-29',
      version: 3,
      state: 'published',
      publishedAt: '2026-11-29T21:00:00.000Z',
      publishedBy: 'Desmond Hale',
    });
    await night('2026-11-29', [
      planSummary({ id: PLAN_IDS.draft, serviceDate: '2026-11-29', version: 4, state: 'draft' }),
      planSummary({ id: PLAN_IDS.published, serviceDate: '2026-11-29', version: 3, state: 'published' }),
    ]);
    await detail(published);
    mock.expectNone((r) => r.url.endsWith('/plans'));

    expect(fact('night')).toContain('29');
    expect(fact('night')).toContain('November');
    expect(fact('version')).toBe('3');
    // Published at 21:00 UTC: 15:00 at the depot, 24-hour, whatever the browser's zone.
    expect(fact('published')).toMatch(/15:00 by Desmond Hale$/);
    expect(fact('not-tonight')).toContain('No plan is published for tonight');
    expect(fact('buses')).toBe('3');
    expect(fact('plug-ins')).toBe('3');
    expect(fact('cost')).toContain('100.00');
    // The night on energy against its baseline (demand is the month's): $10 planned, $20 on arrival.
    expect(fact('energy')).toContain('10.00');
    expect(fact('baseline')).toContain('20.00');
    expect(fact('saving')).toContain('10.00');
    expect(fact('saving')).toContain('50 % less');
    // Two notes, two words: "(50 % less)and keeps" ran together.
    expect(fact('saving')).toContain('(50 % less) and keeps the peak');
    // The demand side of the night, which the energy alone does not show.
    expect(fact('peak-cut')).toBe(
      "and keeps the peak at 120 kW where the baseline would reach 190 kW: demand is billed on the month's peak",
    );
    expect(fact('peak')).toContain('120 kW of 150 kW limit');
    const link = el.querySelector<HTMLAnchorElement>('a[href^="/plans"]')!;
    expect(text(link)).toBe('Open version 3 in Plans');
    expect(link.getAttribute('href')).toBe(`/plans?date=2026-11-29&plan=${PLAN_IDS.published}`);
    const headings = [...el.querySelectorAll('h2')].map((h) => text(h));
    expect(headings).toEqual(
      expect.arrayContaining(["Tonight's plan", 'Cost and peak load', 'Short buses', 'Chargers right now']),
    );
  });

  it('lists the short buses with their reasons in words, largest shortfall first', async () => {
    await start();
    await chargers([]);
    await night('2026-12-01', [planSummary({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published' })]);
    await detail(planDetail({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published' }));
    expect(fact('short-count')).toBe('2 buses short');
    const items = [...el.querySelectorAll('.short-list li')].map((li) => words(li));
    expect(items).toEqual(['Bus 203: Site service limit, 30 kWh short', 'Bus 205: Dwell too short, 12.5 kWh short']);
  });

  it('counts the chargers by live state and marks faulted ones with an icon and a word', async () => {
    await start();
    await chargers([
      charger('C1', { live: { status: 'charging', powerKw: 42.5, seenAt: null } }),
      charger('C10', { live: { status: 'available', powerKw: 0, seenAt: null } }),
      charger('C2', { live: { status: 'faulted', powerKw: null, seenAt: null } }),
      charger('C3', { live: { status: 'charging', powerKw: 60, seenAt: null } }),
      charger('C4', { live: { status: 'offline', powerKw: null, seenAt: null }, status: 'out_of_service' }),
      charger('C5', { live: null }),
      charger('C6', { live: { status: 'offline', powerKw: null, seenAt: '2026-12-01T13:20:00.000Z' } }),
      charger('C7', { live: { status: 'connected', powerKw: 0, seenAt: null } }),
    ]);
    for (const date of ['2026-12-01', '2026-11-30', '2026-11-29', '2026-11-28', '2026-11-27']) await night(date, []);

    const count = (state: string) => words(el.querySelector(`.counts li[data-state="${state}"]`));
    expect(count('charging')).toBe('2 Charging');
    expect(count('available')).toBe('1 Available');
    // A bus on the connector waiting for its hours is not an available charger.
    expect(count('connected')).toBe('1 Plugged in, not charging');
    expect(count('faulted')).toBe('1 Faulted');
    // Out of service: said so, whatever idle state its station reports.
    expect(count('offline')).toBe('1 Offline');
    // Offline is not out of service: the note says the two apart.
    expect(words(el.querySelector('[data-fact="offline-note"]'))).toMatch(
      /^Offline: not connected to Nightyard now, so the plan's power limits do not reach it\. In service means/,
    );
    expect(count('out')).toBe('1 Out of service');
    expect(count('unknown')).toBe('1 No reading');
    expect(el.querySelector('.counts li[data-state="faulted"]')!.classList.contains('faulted')).toBe(true);

    const labels = [...el.querySelectorAll('.charger-list li')].map((li) => li.getAttribute('data-charger'));
    expect(labels).toEqual(['C1', 'C2', 'C3', 'C4', 'C5', 'C6', 'C7', 'C10']);
    const c = (label: string) => el.querySelector(`.charger-list li[data-charger="${label}"]`)!;
    expect(words(c('C1'))).toBe('C1 Charging, 42.5 kW');
    expect(words(c('C2'))).toBe('C2 Faulted');
    expect(c('C2').querySelector('mat-icon')?.textContent?.trim()).toBe('error');
    expect(c('C2').classList.contains('faulted')).toBe(true);
    expect(words(c('C4'))).toBe('C4 Out of service');
    // Last heard at the depot's time (America/Chicago here: 07:20 on 1 December).
    expect(words(c('C6'))).toMatch(/^C6 Offline, last heard .*Dec 1.*07:20$/);
  });

  it('shows a fault pushed over the live stream at once, with the way to the re-plan, and drops it when cleared', async () => {
    await start(['supervisor']);
    await chargers([charger('C1'), charger('C2')]);
    for (const date of ['2026-12-01', '2026-11-30', '2026-11-29', '2026-11-28', '2026-11-27']) await night(date, []);
    const live = TestBed.inject(FakeLiveTransport);
    expect(live.last.depotId).toBe(DEPOT_ID);
    expect(el.querySelector('ny-charger-faults')).toBeNull();
    const state = (status: 'faulted' | 'available') => ({
      type: 'charger' as const,
      at: '2026-12-02T04:00:05.000Z',
      charger: { chargerId: 'charger-C2', label: 'C2', status, powerKw: null, seenAt: '2026-12-02T04:00:05.000Z' },
    });
    expect(fact('live')).toBe('As the chargers last reported');
    live.last.events.next(state('faulted'));
    await render();
    expect(fact('live')).toBe('Live: changes show as the chargers report them');
    const notice = el.querySelector('[data-fault="C2"]')!;
    expect(notice.getAttribute('role')).toBe('alert');
    expect(words(notice)).toContain('Charger C2 reports a fault (since 22:00, depot time)');
    const link = notice.querySelector('a')!;
    expect(words(link)).toBe('Re-plan without charger C2');
    expect(link.getAttribute('href')).toBe('/yard?fault=C2');
    expect(words(el.querySelector('.counts li[data-state="faulted"]'))).toBe('1 Faulted');
    live.last.events.next(state('available'));
    await render();
    expect(el.querySelector('[data-fault]')).toBeNull();
  });

  it('tells roles that cannot re-plan whom to tell, and reloads when a revision is published', async () => {
    await start(['finance']);
    await chargers([charger('C2', { live: { status: 'faulted', powerKw: null, seenAt: null } })]);
    for (const date of ['2026-12-01', '2026-11-30', '2026-11-29', '2026-11-28', '2026-11-27']) await night(date, []);
    const notice = el.querySelector('[data-fault="C2"]')!;
    expect(notice.querySelector('a')).toBeNull();
    expect(words(notice)).toContain('Tell the yard staff or the supervisor');
    const live = TestBed.inject(FakeLiveTransport);
    live.last.events.next({ type: 'snapshot', at: '2026-12-02T04:00:00.000Z', chargers: [] });
    live.last.events.next({
      type: 'plan',
      at: '2026-12-02T04:01:00.000Z',
      planId: PLAN_IDS.published,
      serviceDate: '2026-12-01',
      version: 2,
      kind: 'revised',
    });
    await render();
    await chargers([
      charger('C2', { status: 'out_of_service', live: { status: 'faulted', powerKw: null, seenAt: null } }),
    ]);
    await night('2026-12-01', [
      planSummary({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published', version: 2 }),
    ]);
    await detail(planDetail({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published', version: 2 }));
    expect(fact('version')).toBe('2');
    // The depot card's counts are asked for on opening and again with the revision (a bus absent).
    expect(depotRefreshes).toBe(2);
    // Out of service now: the night was re-planned without it, no more call to act.
    expect(el.querySelector('[data-fault]')).toBeNull();
  });

  it('says plainly when no plan is published, with a link to Plans for those who can generate', async () => {
    await start(['admin']);
    await chargers([]);
    for (const date of ['2026-12-01', '2026-11-30', '2026-11-29', '2026-11-28', '2026-11-27']) await night(date, []);
    mock.expectNone((r) => r.url.includes('/plans'));
    expect(text(el.querySelector('#ny-tonight-none'))).toBe('No published plan');
    expect(fact('no-plan')).toContain('No plan has been published for tonight or the 4 nights before');
    const link = el.querySelector<HTMLAnchorElement>('a[href="/plans"]')!;
    expect(text(link)).toBe('Generate a plan in Plans');
  });

  it('offers no Plans link to roles that cannot generate', async () => {
    await start(['yard']);
    await chargers([]);
    for (const date of ['2026-12-01', '2026-11-30', '2026-11-29', '2026-11-28', '2026-11-27']) await night(date, []);
    expect(fact('no-plan')).toContain('No plan has been published');
    expect(el.querySelector('a[href^="/plans"]')).toBeNull();
  });

  it('offers the plan link only to roles that can open Plans', async () => {
    await start(['yard']);
    await chargers([]);
    await night('2026-12-01', [planSummary({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published' })]);
    await detail(planDetail({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published' }));
    expect(fact('version')).toBe('2');
    expect(el.querySelector('a[href^="/plans"]')).toBeNull();
  });

  it('shows a problem with a retry when the plans cannot be loaded', async () => {
    await start();
    await chargers([]);
    mock
      .expectOne((r) => r.url === `/api/depots/${DEPOT_ID}/plans`)
      .flush({ title: 'Server error' }, { status: 500, statusText: 'Server Error' });
    await render();
    expect(text(el.querySelector('[role="alert"]'))).toContain("Tonight's plan could not be loaded");
    el.querySelector<HTMLButtonElement>('[role="alert"] button')!.click();
    await render();
    mock.expectOne(`/api/depots/${DEPOT_ID}`).flush({ depot: { id: DEPOT_ID, chargers: [] } });
    await night('2026-12-01', [planSummary({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published' })]);
    await detail(planDetail({ id: PLAN_IDS.published, serviceDate: '2026-12-01', state: 'published' }));
    expect(el.querySelector('[role="alert"]')).toBeNull();
    expect(fact('version')).toBe('2');
  });
});
