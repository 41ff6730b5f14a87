import { BreakpointObserver } from '@angular/cdk/layout';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { DistrictDepot, DistrictOverview, Role } from '@nightyard/contracts';
import { of } from 'rxjs';
import { AuthStore } from '../auth/auth-store';
import { NORTH_ID, SOUTH_ID, settle, tokenResponse } from '../testing/fixtures';
import { DistrictPage } from './district-page';

function depotRow(overrides: Partial<DistrictDepot> = {}): DistrictDepot {
  return {
    depot: { id: NORTH_ID, name: 'North Depot', timezone: 'America/Chicago' },
    tonight: {
      serviceDate: '2026-12-03',
      planState: 'published',
      planVersion: 3,
      busesOut: 11,
      shortBuses: 0,
      shortKwh: 0,
      peakKw: 412.4,
      serviceLimitKw: 500,
      cost: 101.005,
    },
    period: {
      start: '2026-12-01',
      end: '2027-01-01',
      ratePlanName: 'Commercial TOU',
      billToDate: 1000.004,
      projectedBill: 4321.5,
      peakKw: 430,
      targetKw: null,
    },
    ...overrides,
  };
}

/** Two depots; the totals the API would send (unrounded) differ from the shown sum by a cent. */
const OVERVIEW: DistrictOverview = {
  currency: 'USD',
  depots: [
    depotRow(),
    depotRow({
      depot: { id: SOUTH_ID, name: 'Riverside Depot', timezone: 'America/Denver' },
      tonight: {
        serviceDate: '2026-12-03',
        planState: 'draft',
        planVersion: 1,
        busesOut: 7,
        shortBuses: 2,
        shortKwh: 14.25,
        peakKw: 310,
        serviceLimitKw: 300,
        cost: 55.005,
      },
      period: {
        start: '2026-11-15',
        end: '2026-12-15',
        ratePlanName: 'Winter Ratchet',
        billToDate: 800.004,
        projectedBill: 2000,
        peakKw: 290,
        targetKw: 280,
      },
    }),
  ],
  totals: { tonightCost: 156.01, shortBuses: 2, billToDate: 1800.008, projectedBill: 6321.5 },
};

describe('DistrictPage', () => {
  let mock: HttpTestingController;

  async function render(roles: Role[], phone: boolean, overview: DistrictOverview = OVERVIEW) {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(),
        provideHttpClientTesting(),
        {
          provide: BreakpointObserver,
          useValue: { isMatched: () => phone, observe: () => of({ matches: phone, breakpoints: {} }) },
        },
      ],
    });
    mock = TestBed.inject(HttpTestingController);
    const auth = TestBed.inject(AuthStore);
    const signingIn = auth.signIn('ada@example.org', 'pw');
    mock.expectOne('/api/auth/login').flush(tokenResponse(roles));
    await signingIn;
    const fixture = TestBed.createComponent(DistrictPage);
    fixture.detectChanges();
    await settle();
    mock.expectOne('/api/district').flush(overview);
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
    return fixture.nativeElement as HTMLElement;
  }

  afterEach(() => mock.verify());

  const cells = (row: Element) =>
    [...row.querySelectorAll('th, td')].map((c) => c.textContent?.replace(/\s+/g, ' ').trim() ?? '');

  it('shows each depot tonight and in its billing period, with totals of the figures shown', async () => {
    const el = await render(['admin'], false);
    expect(el.querySelector('h1')?.textContent).toBe('District');
    const heads = [...el.querySelectorAll('thead tr:last-child th')].map((c) => c.textContent?.trim());
    expect(heads).toEqual([
      'Depot',
      'Plan',
      'Short buses',
      'Peak of service limit',
      'Energy, planned',
      'Period',
      'Bill to date',
      'Projected bill',
      'Facility peak',
      'Open',
    ]);
    const rows = [...el.querySelectorAll('tbody tr')].map(cells);
    expect(rows[0]).toEqual([
      'North Depot, night of Thu, Dec 3',
      'Published, version 3',
      'None',
      '412.4 kW of 500 kW',
      '$101.01',
      'December 2026, Commercial TOU',
      '$1,000.00',
      '$4,321.50',
      '430 kW',
      'TonightPlansCosts',
    ]);
    expect(rows[1]!.slice(0, 9)).toEqual([
      'Riverside Depot, night of Thu, Dec 3',
      'Draft, not published',
      '2 buses, 14.3 kWh short',
      '310 kW of 300 kW',
      '$55.01',
      'Nov 15 – Dec 14, 2026, Winter Ratchet',
      '$800.00',
      '$2,000.00',
      '290 kW , demand target 280 kW',
    ]);
    // A peak over the service limit is marked.
    expect(el.querySelectorAll('tbody tr')[1]!.querySelector('.meter .fill.over')).not.toBeNull();
    // Totals add up what is shown: $101.01 + $55.01 = $156.02 (the unrounded sum is $156.01).
    expect(cells(el.querySelector('tfoot tr')!)).toEqual([
      'All 2 depots',
      '',
      '2 buses',
      '',
      '$156.02',
      '',
      '$1,800.00',
      '$6,321.50',
      '',
      '',
    ]);
  });

  it('links each depot to its Tonight, Plans and Costs, switching to it', async () => {
    const el = await render(['finance'], false);
    const links = [...el.querySelectorAll('tbody tr')[1]!.querySelectorAll('a')].map((a) => [
      a.getAttribute('aria-label'),
      a.getAttribute('href'),
    ]);
    expect(links).toEqual([
      ['Tonight at Riverside Depot', `/tonight?depot=${SOUTH_ID}`],
      ['Plans at Riverside Depot', `/plans?depot=${SOUTH_ID}`],
      ['Costs at Riverside Depot', `/costs?depot=${SOUTH_ID}`],
    ]);
  });

  it('leaves the demand target out when no depot has one, and says when a depot has no plan or rate plan', async () => {
    const el = await render(['admin'], false, {
      ...OVERVIEW,
      depots: [
        depotRow({
          tonight: { ...depotRow().tonight, planState: 'none', planVersion: null, peakKw: null, cost: null },
          period: null,
        }),
      ],
    });
    expect(el.querySelector('tbody')!.textContent).not.toContain('demand target');
    expect(cells(el.querySelector('tbody tr')!).slice(1, 9)).toEqual([
      'No plan yet',
      '–',
      '– of 500 kW',
      '–',
      'No rate plan',
      '–',
      '–',
      '–',
    ]);
    expect(cells(el.querySelector('tfoot tr')!)[4]).toBe('$0.00');
  });

  it('shows a card per depot at phone width, with the totals last', async () => {
    const el = await render(['admin'], true);
    expect(el.querySelector('table')).toBeNull();
    const cards = [...el.querySelectorAll('li.card')];
    expect(cards.map((c) => c.querySelector('h2')?.textContent)).toEqual([
      'North Depot',
      'Riverside Depot',
      'All 2 depots',
    ]);
    const riverside = cards[1]!.textContent!.replace(/\s+/g, ' ');
    expect(riverside).toContain('Tonight, Thu, Dec 3');
    expect(riverside).toContain('Short buses2 buses, 14.3 kWh short');
    expect(riverside).toContain('Demand target280 kW');
    expect(cards[0]!.textContent).not.toContain('Demand target');
    expect(cards[2]!.textContent!.replace(/\s+/g, ' ')).toContain('Energy tonight, planned$156.02');
  });

  it('says what went wrong and offers to try again', async () => {
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()],
    });
    mock = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(DistrictPage);
    fixture.detectChanges();
    await settle();
    mock
      .expectOne('/api/district')
      .flush({ error: { code: 'unavailable', message: 'The database is away.' } }, { status: 503, statusText: 'x' });
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
    const el = fixture.nativeElement as HTMLElement;
    expect(el.querySelector('[role="alert"]')?.textContent).toContain(
      'The district could not be loaded. The database is away.',
    );
    [...el.querySelectorAll('button')].find((b) => b.textContent?.trim() === 'Try again')!.click();
    fixture.detectChanges();
    await settle();
    mock.expectOne('/api/district').flush(OVERVIEW);
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
    expect(el.querySelectorAll('tbody tr')).toHaveLength(2);
  });
});
