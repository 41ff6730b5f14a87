import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { MonthCosts, Role } from '@nightyard/contracts';
import { AuthStore } from '../auth/auth-store';
import { depot, settle, tokenResponse } from '../testing/fixtures';
import { monthCosts, periodTarget } from './costs-fixtures';
import { CostsPage, floorsWhy } from './costs-page';

describe('CostsPage', () => {
  let fixture: ComponentFixture<CostsPage>;
  let el: HTMLElement;
  let mock: HttpTestingController;
  const DEPOT = depot();
  const MONTH_URL = `/api/depots/${DEPOT.id}/costs/month`;

  beforeEach(() => {
    TestBed.configureTestingModule({ providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()] });
    mock = TestBed.inject(HttpTestingController);
  });

  afterEach(() => mock.verify());

  async function refresh() {
    await settle();
    TestBed.tick(); // not whenStable: it would wait for the unanswered request
    await settle();
    fixture.detectChanges();
  }

  async function render(roles: Role[], month: MonthCosts | 'no-rate-plan' = monthCosts(), date = '2026-12-02') {
    const auth = TestBed.inject(AuthStore);
    const signingIn = auth.signIn('ada@example.org', 'pw');
    mock.expectOne('/api/auth/login').flush(tokenResponse(roles));
    await signingIn;
    fixture = TestBed.createComponent(CostsPage);
    fixture.componentRef.setInput('date', date);
    el = fixture.nativeElement;
    await refresh();
    mock.expectOne('/api/depots').flush({ depots: [DEPOT] });
    await refresh();
    const req = mock.expectOne((r) => r.url === MONTH_URL);
    expect(req.request.params.get('date')).toBe(date);
    if (month === 'no-rate-plan') {
      req.flush(
        {
          error: {
            code: 'validation_failed',
            message: `No rate plan applies to North Depot on ${date}: assign one under Rates`,
            fields: { date: 'No rate plan' },
          },
        },
        { status: 400, statusText: 'Bad Request' },
      );
    } else {
      req.flush(month);
    }
    await refresh();
  }

  const text = (e: Element | null) => e?.textContent?.replace(/\s+/g, ' ').trim() ?? '';
  const cells = (tr: Element | null) =>
    [...(tr?.children ?? [])]
      .map((c) => text(c))
      .filter(Boolean)
      .join(' ');
  const card = (label: string) =>
    [...el.querySelectorAll('.cards .card')].find((c) => text(c.querySelector('.card-label')) === label);

  it('shows the projected bill, month to date, savings and the facility peak so far', async () => {
    await render(['finance']);
    expect(text(el.querySelector('.period-title'))).toBe('December 2026');
    expect(text(card('Projected bill for the period')?.querySelector('.card-value') ?? null)).toBe('$2,952.09');
    expect(text(card('Month to date')?.querySelector('.card-value') ?? null)).toBe('$190.25');
    const savings = card('Savings against the baselines')!;
    expect(text(savings.querySelector('.card-value'))).toBe('$312.40');
    expect(text(savings)).toContain(
      'Projected for the whole period: the projected bill $4,100.25 (facility demand 185 kW) against $4,412.65 with the 2 published nights charged as their baselines instead (facility demand 410 kW).',
    );
    const peak = card('Facility peak so far')!;
    expect(text(peak.querySelector('.card-value'))).toBe('185 kW');
    expect(text(peak)).toContain('from meter data');
    expect(text(peak)).toContain('Period peak: on-peak 48 kW');
  });

  it('the saving is the difference of its two bills as shown, to the cent', async () => {
    // Unrounded, 5,904.736 - 4,100.244 is 1,804.492: shown as $1,804.49 beside bills of $4,100.24
    // and $5,904.74, a cent off their difference.
    const month = monthCosts();
    await render(['finance'], {
      ...month,
      savings: { ...month.savings, total: 1_804.492, planBill: 4_100.244, baselineBill: 5_904.736 },
    });
    const savings = card('Savings against the baselines')!;
    expect(text(savings.querySelector('.card-value'))).toBe('$1,804.50');
    expect(text(savings)).toContain('the projected bill $4,100.24 (facility demand 185 kW) against $5,904.74');
  });

  it('shows the demand target, why it is that number and what a kW either side is worth', async () => {
    await render(['finance'], monthCosts({ target: periodTarget() }));
    const panel = el.querySelector('section.target')!;
    expect(text(panel.querySelector('h2'))).toBe('Demand target 212 kW');
    expect(text(panel)).toContain('Period targets: on-peak 48 kW');
    expect(text(panel)).toContain(
      'Why: Monday Dec 14, 05:30: 24 buses need 1,900 kWh between pull-in (16:20) and pull-out (06:10)',
    );
    expect(text(panel)).toContain('Each kW above the target saves $2.10 of energy this period and costs $7.50');
    expect(text(panel)).toContain('Over 2 nights left in the period (1 forecast from the same weekday');
    expect(panel.querySelector('[role="alert"]')).toBeNull();
  });

  it("explains a target held up by a demand ratchet's minimum, not as a peak so far the card beside it does not show", async () => {
    // Kestrel Hollow on Friday 4 December: facility peak so far 129.8 kW, the ratchet bills 80 % of 236 kW.
    await render(
      ['finance'],
      monthCosts({
        peaks: {
          facility: { kw: 129.757, at: '2026-12-03T23:15:00.000Z', source: 'planned' },
          periods: [{ name: 'on-peak', kw: 129.757, at: null }],
        },
        target: periodTarget({
          facilityKw: 188.8,
          targets: [
            { name: 'facility', kw: 188.8, peakSoFarKw: 188.8, rate: 11.5 },
            { name: 'on-peak', kw: 129.757, peakSoFarKw: 129.75652173913045, rate: 6 },
          ],
          binding: null,
          ratchet: {
            kw: 188.8,
            percent: 80,
            baseKw: 236,
            source: 'from peaks entered in Depot for the period from 2026-11-01',
          },
        }),
      }),
    );
    const panel = el.querySelector('section.target')!;
    expect(text(panel.querySelector('h2'))).toBe('Demand target 188.8 kW');
    expect(text(panel)).toContain(
      "Why: No night left needs more than is billed already, so each target is its floor: facility 188.8 kW, the demand ratchet's minimum (80 % of 236 kW, from peaks entered in Depot for the period from 2026-11-01); on-peak 129.8 kW, the peak so far.",
    );
    expect(text(panel)).not.toContain('the target is the peak so far');
    // Above the peak so far, a floor is the peak the night under way still draws as published.
    const m = monthCosts({ target: periodTarget() });
    expect(
      floorsWhy(
        { ...m.target!, ratchet: null, targets: [{ name: 'facility', kw: 261.2, peakSoFarKw: 261.2, rate: 7.5 }] },
        { ...m.peaks, facility: { ...m.peaks.facility, kw: 185 } },
      ),
    ).toBe(
      "No night left needs more than is billed already, so each target is its floor: facility 261.2 kW, the peak tonight's published plan still draws.",
    );
  });

  it('explains a night no target can serve, and shows no target for a period without one', async () => {
    const sentence =
      'Monday Dec 14: the runs need 75.5 kWh more than the service limit (22 kW at its lowest) lets the chargers deliver before pull-out. No target can serve it; raise the limit or move runs.';
    await render(
      ['finance'],
      monthCosts({
        target: periodTarget({
          impossible: [{ night: 'Monday Dec 14', shortKwh: 75.5, cause: 'service limit', sentence }],
        }),
      }),
    );
    expect(text(el.querySelector('section.target [role="alert"]'))).toBe(sentence);
  });

  it('shows no demand target when the period has none left', async () => {
    await render(['finance']);
    expect(el.querySelector('section.target')).toBeNull();
  });

  it('says where the projection comes from and how many school nights have no plan', async () => {
    await render(['finance']);
    const sources = text(el.querySelector('.sources'));
    expect(sources).toContain('meter data where it was imported (96 metered 15-minute intervals)');
    expect(sources).toContain('site load of the published plans (2 published plans)');
    expect(sources).toContain("depot's building load");
    expect(sources).toContain('3 school nights have no published plan yet');
  });

  it('gives the projected bill a range while nights are forecast, and says how they are forecast', async () => {
    const forecast = [
      { date: '2026-12-09', needKwh: 210, basis: 'runs' as const },
      { date: '2026-12-14', needKwh: 205, basis: 'typical-weekday' as const },
    ];
    await render(
      ['finance'],
      monthCosts({
        forecast,
        projectedRange: { low: 2_801.5, high: 2_952.09 },
        sources: { actualIntervals: 96, plannedNights: 2, forecastNights: 2, schoolNightsWithoutPlan: 1 },
      }),
    );
    expect(text(card('Projected bill for the period') ?? null)).toContain(
      '2 nights are forecast: between $2,801.50 and $2,952.09.',
    );
    const sources = text(el.querySelector('.sources'));
    expect(sources).toContain('2 nights are forecast from the runs');
    expect(sources).toContain('the latest entered day of the same weekday');
    expect(sources).toContain(
      "a night still to come draws it in the hours the target's own calculation charged that night",
    );
    expect(sources).not.toContain('no published plan yet');
  });

  it('renders the projected bill with its total, and the bill to date on demand', async () => {
    await render(['finance']);
    expect(cells(el.querySelector('ny-bill-table tr.grand-total'))).toBe('Total $2,952.09');
    const toDate = [...el.querySelectorAll<HTMLButtonElement>('mat-button-toggle button')].find(
      (b) => text(b) === 'To date',
    )!;
    toDate.click();
    await refresh();
    expect(text(el.querySelector('#costs-bill-heading'))).toBe('Bill to date');
    expect(cells(el.querySelector('ny-bill-table tr.grand-total'))).toBe('Total $190.25');
  });

  it('lists the nights with links to their costs per bus', async () => {
    await render(['finance']);
    const rows = [...el.querySelectorAll('ny-nights-table tbody tr')];
    expect(rows).toHaveLength(2);
    const link = rows[0]!.querySelector('a')!;
    expect(link.getAttribute('href')).toBe('/costs/nights/00000000-0000-4000-8000-0000000000a1');
    expect(text(link)).toMatch(/Dec.*costs per bus and per mile/);
    expect(text(rows[0]!)).toContain('+$3.50');
    expect(text(rows[1]!)).toContain('none');
  });

  it('compares a partly metered night over its metered intervals only', async () => {
    const base = monthCosts();
    const partly = {
      ...base.nights[0]!,
      actualSiteEnergyCost: 20.54,
      actualCoverage: 0.377,
      actualPeakKw: 72,
      projectedMeteredSiteEnergyCost: 19.04,
    };
    await render(['finance'], monthCosts({ nights: [partly, base.nights[1]!] }));
    const row = el.querySelector('ny-nights-table tbody tr')!;
    const cellsOf = [...row.children].map(text);
    expect(cellsOf[5]).toBe('$20.54 part of the night');
    expect(cellsOf[6]).toBe('+$1.50 metered part only');
    expect(cellsOf[10]).toBe('37.7 %');
    const metered = [...el.querySelectorAll<HTMLButtonElement>('ny-nights-chart mat-button-toggle button')].find(
      (b) => text(b) === 'Projected and metered',
    )!;
    metered.click();
    await refresh();
    const canvas = el.querySelector('ny-nights-chart canvas')!;
    expect(canvas.getAttribute('aria-label')).toBe('Bar chart: site energy cost of each night, projected and metered');
    expect(text(el.querySelector(`#${canvas.getAttribute('aria-describedby')}`))).toContain(
      "Meter data covers 1 of 2 nights (1 only in part: both bars of such a night cover its metered intervals only). Over the metered intervals, the site's energy cost $20.54 metered against $19.04 projected.",
    );
  });

  it('shows the diesel and CO2 avoided with the source text word for word', async () => {
    await render(['finance']);
    const card = el.querySelector('ny-emissions-card')!;
    expect(text(card)).toContain('343 gallons');
    expect(text(card)).toContain('3.49 tonnes');
    expect(text(card.querySelector('.source-text'))).toBe(monthCosts().emissions.source);
  });

  it('gives finance the meter data upload', async () => {
    await render(['finance']);
    expect(el.querySelector('ny-meter-import-panel input[type="file"]')).not.toBeNull();
    expect(el.textContent).not.toContain('You can read the costs.');
  });

  it('is read-only for supervisors and facilities: no upload control', async () => {
    await render(['supervisor', 'facilities']);
    expect(el.querySelector('ny-meter-import-panel')).toBeNull();
    expect(el.querySelector('input[type="file"]')).toBeNull();
    expect(el.querySelector('#costs-import-heading')).toBeNull();
    expect(text(el.querySelector('.sources'))).toContain(
      "You can read the costs. Finance and administrators import the utility's meter data.",
    );
    // The figures themselves are there.
    expect(text(card('Savings against the baselines')?.querySelector('.card-value') ?? null)).toBe('$312.40');
  });

  it('gives the nights chart a description and a table alternative', async () => {
    await render(['finance']);
    const canvas = el.querySelector('ny-nights-chart canvas')!;
    expect(canvas.getAttribute('role')).toBe('img');
    expect(canvas.getAttribute('aria-label')).toBe(
      'Bar chart: charging energy cost of each night, planned and under its baseline',
    );
    const summary = el.querySelector(`#${canvas.getAttribute('aria-describedby')}`)!;
    expect(text(summary)).toContain(
      "Their charging energy costs $190.50 planned, against $280.30 under each night's baseline: $89.80 saved on energy",
    );
    const alt = el.querySelector('ny-nights-chart details')!;
    expect(text(alt.querySelector('summary'))).toBe('The chart as a table');
    const rows = [...alt.querySelectorAll('tbody tr')].map((r) => [...r.children].map(text));
    expect(rows).toHaveLength(2);
    expect(rows[0]!.slice(1)).toEqual(['$100.50', '$150.10', '$98.20', '—', '$101.70']);
    expect(rows[1]!.slice(1)).toEqual(['$90.00', '$130.20', '$90.00', '—', '—']);
  });

  it('says clearly when the month has no rate plan, and keeps the period controls', async () => {
    await render(['finance'], 'no-rate-plan', '2020-01-15');
    expect(text(el.querySelector('[role="alert"]'))).toContain(
      'No rate plan applies to North Depot on 2020-01-15: assign one under Rates',
    );
    expect(el.querySelector('button[aria-label="Previous billing period"]')).not.toBeNull();
    expect(el.querySelector('.cards')).toBeNull();
  });
});
