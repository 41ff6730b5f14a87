import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { settle } from '../testing/fixtures';
import { planCosts } from './costs-fixtures';
import { NightCostsPage } from './night-costs-page';

describe('NightCostsPage', () => {
  it('shows the night against its baseline (and the other beside it) and the cost per bus and per mile', async () => {
    TestBed.configureTestingModule({ providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()] });
    const mock = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(NightCostsPage);
    fixture.componentRef.setInput('planId', '00000000-0000-4000-8000-0000000000a1');
    TestBed.tick(); // not whenStable: it would wait for the unanswered request
    await settle();
    mock.expectOne('/api/plans/00000000-0000-4000-8000-0000000000a1/costs').flush(planCosts());
    await settle();
    TestBed.tick(); // not whenStable: it would wait for the unanswered request
    await settle();
    fixture.detectChanges();
    const el = fixture.nativeElement as HTMLElement;
    const text = (e: Element | null) => e?.textContent?.replace(/\s+/g, ' ').trim() ?? '';

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
});
