import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { Role } from '@nightyard/contracts';
import { AuthStore } from '../auth/auth-store';
import { depot, settle, tokenResponse } from '../testing/fixtures';
import { DEPOT_ID, depotDetail } from '../shared/setup-fixtures';
import { DepotPage } from './depot-page';
import { FakeLiveTransport, provideFakeLive } from '../testing/live-fake';

describe('DepotPage', () => {
  let fixture: ComponentFixture<DepotPage>;
  let el: HTMLElement;
  let mock: HttpTestingController;

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting(), provideFakeLive()],
    });
    mock = TestBed.inject(HttpTestingController);
  });

  afterEach(() => mock.verify());

  async function render(roles: Role[], detail = depotDetail()) {
    const store = TestBed.inject(AuthStore);
    const signingIn = store.signIn('ada@example.org', 'pw');
    mock.expectOne('/api/auth/login').flush(tokenResponse(roles));
    await signingIn;
    fixture = TestBed.createComponent(DepotPage);
    el = fixture.nativeElement;
    mock.expectOne('/api/depots').flush({ depots: [depot({ id: DEPOT_ID })] });
    await settle();
    mock.expectOne(`/api/depots/${DEPOT_ID}`).flush({ depot: detail });
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
  }

  const buttons = () =>
    [...el.querySelectorAll('button, a')].map((b) =>
      (b.getAttribute('aria-label') ?? b.textContent ?? '').replace(/\s+/g, ' ').trim(),
    );

  it('lets a facilities manager change every part of the depot', async () => {
    await render(['facilities']);
    expect(el.querySelector('h1')?.textContent).toBe('Depot');
    const names = buttons();
    for (const name of [
      'editEdit site',
      'addAdd charger',
      'Edit charger D1',
      'Remove charger D1',
      'addAdd power cabinet',
      'Edit power cabinet Cabinet A',
      'edit_calendarEdit windows',
      'editEdit peaks',
    ]) {
      expect(names).toContain(name);
    }
  });

  it('shows a finance user the same depot read-only: no edit controls', async () => {
    await render(['finance']);
    expect(el.textContent).toContain('North Depot');
    expect(el.textContent).toContain('450 kW');
    expect(el.querySelectorAll('tr[mat-row]').length).toBeGreaterThanOrEqual(4);
    expect(el.textContent).toContain('Cabinet A');
    expect(el.textContent).toContain('Utility event');
    expect(el.textContent).toContain('212 kW');
    expect(el.textContent).toContain("You can read the depot's set-up.");
    expect(buttons().filter((b) => /Edit|Add|Remove/.test(b))).toEqual([]);
    expect(el.querySelector('form')).toBeNull();
  });

  it('shows a charger fault pushed over the live stream in the table and above it, with the way to the re-plan', async () => {
    const detail = depotDetail();
    await render(['facilities', 'supervisor'], detail);
    const d1 = detail.chargers.find((c) => c.label === 'D1')!;
    TestBed.inject(FakeLiveTransport).last.events.next({
      type: 'charger',
      at: '2026-12-02T04:00:00.000Z',
      charger: { chargerId: d1.id, label: 'D1', status: 'faulted', powerKw: null, seenAt: '2026-12-02T04:00:00.000Z' },
    });
    await settle();
    fixture.detectChanges();
    const notice = el.querySelector('[data-fault="D1"]')!;
    expect(notice.textContent).toContain('Charger D1 reports a fault');
    expect(notice.querySelector('a')?.getAttribute('href')).toBe('/yard?fault=D1');
    expect(el.textContent).toContain('Reports faulted');
  });
});
