import { provideHttpClient } from '@angular/common/http';
import { provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { Clock } from '../core/clock';
import { DEPOT_ID } from '../shared/setup-fixtures';
import { settle } from '../testing/fixtures';
import { PeaksSoFarPanel } from './peaks-so-far-panel';

describe('PeaksSoFarPanel', () => {
  let fixture: ComponentFixture<PeaksSoFarPanel>;

  async function show(billingPeriodStart: string): Promise<string> {
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
    // Thursday 3 December 2026, 14:00 at a depot in America/Denver: the period from 1 December.
    TestBed.inject(Clock).setServerTime(Date.parse('2026-12-03T21:00:00.000Z'));
    fixture = TestBed.createComponent(PeaksSoFarPanel);
    fixture.componentRef.setInput('depotId', DEPOT_ID);
    fixture.componentRef.setInput('timezone', 'America/Denver');
    fixture.componentRef.setInput('billingStartDay', 1);
    fixture.componentRef.setInput('peaks', { billingPeriodStart, facilityKw: 236, periods: { 'on-peak': 64 } });
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
    return (fixture.nativeElement as HTMLElement).textContent!.replace(/\s+/g, ' ');
  }

  it("says when the peaks shown are an earlier billing period's, which plans do not count", async () => {
    const text = await show('2026-11-01');
    expect(text).toContain('236 kW');
    expect(text).toContain('These peaks are of an earlier billing period: the current one started');
    expect(text).toContain('Plans of this period do not count them as peaks so far');
  });

  it("says nothing of the kind for the current period's peaks", async () => {
    const text = await show('2026-12-01');
    expect(text).toContain('236 kW');
    expect(text).not.toContain('earlier billing period');
  });
});
