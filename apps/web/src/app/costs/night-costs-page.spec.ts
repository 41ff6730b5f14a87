import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { settle } from '../testing/fixtures';
import { planCosts } from './costs-fixtures';
import { NightCostsPage } from './night-costs-page';

const text = (e: Element | null) => e?.textContent?.replace(/\s+/g, ' ').trim() ?? '';

describe('NightCostsPage', () => {
  async function render(costs = planCosts()) {
    TestBed.resetTestingModule();
    TestBed.configureTestingModule({ providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()] });
    const mock = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(NightCostsPage);
    fixture.componentRef.setInput('planId', '00000000-0000-4000-8000-0000000000a1');
    TestBed.tick(); // not whenStable: it would wait for the unanswered request
    await settle();
    mock.expectOne('/api/plans/00000000-0000-4000-8000-0000000000a1/costs').flush(costs);
    await settle();
    TestBed.tick(); // not whenStable: it would wait for the unanswered request
    await settle();
    fixture.detectChanges();
    return { el: fixture.nativeElement as HTMLElement, mock };
  }

  it('shows the night against its baseline (and the other beside it) and the cost per bus and per mile', async () => {
    const { el, mock } = await render();

    expect(text(el.querySelector('h1'))).toMatch(/^Night of Tuesday/);
    // A night's saving is on charging energy ($150.10 - $100.50); demand is the period's.
    expect(text(el.querySelector('.savings .card-value'))).toBe('$49.60');
    expect(text(el.querySelector('.savings'))).toContain("33 % of the baseline's charging energy");
    expect(text(el.querySelector('.savings'))).toContain("The plan's peak 185 kW against the baseline's 410 kW");
    expect(text(el.querySelector('.savings'))).toContain('Demand is billed once a billing period');
    expect(text(el.querySelector('.cards'))).toMatch(/Baseline: timer\s*\$150\.10/);
    expect(text(el.querySelector('.cards'))).toContain('Charge on arrival: $160.40, peak 420 kW');
    const rows = [...el.querySelectorAll('table.buses tbody tr')].map((r) => [...r.children].map(text));
    expect(rows).toEqual([
      ['201', '80 kWh', '$70.20', '58', '$1.21'],
      ['202', '60.5 kWh', '$50.30', '58', '$0.87'],
      ['203', '0 kWh', '$0.00', '0', '—'],
    ]);
    expect([...el.querySelectorAll('table.buses tfoot td')].map(text)).toEqual([
      '140.5 kWh',
      '$120.50',
      '116',
      '$1.04',
    ]);
    expect(el.querySelector('a[href^="/plans"]')?.getAttribute('href')).toBe(
      '/plans?plan=00000000-0000-4000-8000-0000000000a1',
    );
    mock.verify();
  });

  it('no card is a cent off another: the parts foot to the total, the saving is the shown difference', async () => {
    // Unrounded: energy 100.504 + demand 20.004 = 120.508, saving 150.106 - 100.504 = 49.602. Each
    // rounded alone, the parts read $100.50 + $20.00 beside a total of $120.51, and the saving
    // $49.60 beside $150.11 and $100.50.
    const { el } = await render(
      planCosts({
        energy: 100.504,
        demand: 20.004,
        total: 120.508,
        baseline: { kind: 'timer', energy: 150.106, demand: 140, total: 290.106, peakKw: 410, shortfallKwh: 0 },
        savings: 49.602,
      }),
    );
    const cents = (e: Element | null) =>
      [...text(e).matchAll(/\$([\d,]+\.\d\d)/g)].map((m) => Math.round(Number(m[1]!.replace(/,/g, '')) * 100));
    const [total, energy, demand] = cents(el.querySelector('.cards .card'));
    const [baseline] = cents(el.querySelectorAll('.cards .card')[1]!);
    const [saving] = cents(el.querySelector('.savings .card-value'));
    expect(total).toBe(12051);
    expect(energy! + demand!).toBe(total);
    expect(baseline).toBe(15011);
    expect(saving).toBe(baseline! - energy!);
  });

  it('a saving that rounds to nothing has no sign, and peaks read to the tenth as on every page', async () => {
    const { el } = await render(
      planCosts({
        energy: 83.85,
        total: 103.85,
        baseline: { kind: 'timer', energy: 83.85, demand: 140, total: 223.85, peakKw: 280, shortfallKwh: 0 },
        savings: -1e-13,
        savingsShare: -1e-15,
        peakKw: 188.8,
      }),
    );
    const savings = text(el.querySelector('.savings'));
    expect(text(el.querySelector('.savings .card-value'))).toBe('$0.00');
    expect(savings).toContain("0 % of the baseline's charging energy");
    expect(savings).not.toMatch(/-\$0\.00|-0 %/);
    expect(savings).toContain("The plan's peak 188.8 kW against the baseline's 280 kW");
  });
});
