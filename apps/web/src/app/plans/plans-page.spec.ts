import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatDialog } from '@angular/material/dialog';
import { provideRouter } from '@angular/router';
import type { DepotDetail, Role } from '@nightyard/contracts';
import { of } from 'rxjs';
import { DEPOT_ID, signedInAs } from '../fleet/fleet-fixtures';
import { Clock } from '../core/clock';
import { depotNight, settle } from '../testing/fixtures';
import { PLAN_IDS, planDetail, planSummary } from './plan-fixtures';
import { PlansPage } from './plans-page';

describe('PlansPage', () => {
  let fixture: ComponentFixture<PlansPage>;
  let el: HTMLElement;
  let mock: HttpTestingController;
  const open = vi.fn();

  async function render(roles: Role[]) {
    open.mockReset();
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting(), { provide: MatDialog, useValue: { open } }],
    });
    mock = TestBed.inject(HttpTestingController);
    await signedInAs(mock, roles);
    fixture = TestBed.createComponent(PlansPage);
    fixture.componentRef.setInput('date', '2026-12-03');
    fixture.componentRef.setInput('plan', PLAN_IDS.draft);
    el = fixture.nativeElement;
    await fixture.whenStable();
    mock.expectOne(`/api/depots/${DEPOT_ID}/plans?serviceDate=2026-12-03`).flush({
      plans: [planSummary(), planSummary({ id: PLAN_IDS.published, version: 1, state: 'published', publishedAt: '2026-12-03T19:00:00.000Z' })],
    });
    mock.expectOne(`/api/depots/${DEPOT_ID}`).flush({
      depot: { id: DEPOT_ID, chargers: [{ label: 'C1', maxKw: 60, status: 'in_service' }, { label: 'C2', maxKw: 30, status: 'in_service' }] } as DepotDetail,
    });
    await settle();
    await fixture.whenStable();
    mock.expectOne(`/api/plans/${PLAN_IDS.draft}`).flush({ plan: planDetail() });
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
    for (const req of mock.match((r) => r.url.endsWith('/compare'))) {
      req.flush({ from: { id: PLAN_IDS.published, version: 1 }, to: { id: PLAN_IDS.draft, version: 2 }, moved: [], costChange: 0 });
    }
    await fixture.whenStable();
    fixture.detectChanges();
  }

  afterEach(() => mock.verify());

  const button = (label: string) =>
    [...el.querySelectorAll('button')].find((b) => b.textContent?.replace(/\s+/g, ' ').trim().endsWith(label)) ?? null;

  it('shows the chosen draft with its timeline and short buses first', async () => {
    await render(['supervisor']);
    expect(el.querySelector('#review-heading')?.textContent).toContain('Version 2');
    expect(el.querySelector('ny-charger-timeline')).not.toBeNull();
    const first = el.querySelector('ny-bus-plan-table tbody tr')?.textContent;
    expect(first).toContain('203');
    expect(first).toContain('Site service limit');
    expect([...el.querySelectorAll('.version-list a')].map((a) => a.getAttribute('aria-current'))).toEqual(['true', null]);
  });

  it('asks before publishing, names the plan it replaces, and shows a conflict plainly on 409', async () => {
    await render(['supervisor']);
    open.mockReturnValue({ afterClosed: () => of(true) });
    button('Publish')!.click();
    await settle();
    const dialog = open.mock.calls[0]![1].data;
    expect(dialog.confirm).toBe('Publish plan');
    expect(dialog.message).toContain('A published plan cannot be changed');
    expect(dialog.message).toContain('It replaces version 1');
    expect(dialog.message).toContain('yard staff and fleet supervisors');
    const req = mock.expectOne(`/api/plans/${PLAN_IDS.draft}/publish`);
    expect(req.request.body).toEqual({ expectedPublishedId: PLAN_IDS.published });
    req.flush(
      {
        error: {
          code: 'conflict',
          message: 'Version 3 was published by Tomasz Greer at 21:04 UTC while you were reviewing: compare with it, then publish again',
        },
      },
      { status: 409, statusText: 'Conflict' },
    );
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
    const alert = el.querySelector('.conflict[role="alert"]');
    expect(alert?.textContent).toContain('Not published: someone else published a plan for this night.');
    expect(alert?.textContent).toContain('Version 3 was published by Tomasz Greer');
    expect(button('Reload versions')).not.toBeNull();
    expect(button('Compare with the published version')).not.toBeNull();
  });

  it('publishes nothing when the confirm dialog is cancelled', async () => {
    await render(['supervisor']);
    open.mockReturnValue({ afterClosed: () => of(false) });
    button('Publish')!.click();
    await settle();
    mock.expectNone(`/api/plans/${PLAN_IDS.draft}/publish`);
  });

  it('is read-only for finance: no generate, publish, what-if or scenario download', async () => {
    await render(['finance']);
    for (const label of ['Generate plan', 'Publish', 'Upload what-if', 'Download scenario']) expect(button(label)).toBeNull();
    expect(el.querySelector('input[type="file"]')).toBeNull();
    expect(el.querySelector('ny-bus-plan-table')).not.toBeNull();
  });

  it("opens on tonight as the server says: after midnight that is the night before the depot's date", async () => {
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting(), { provide: MatDialog, useValue: { open } }],
    });
    mock = TestBed.inject(HttpTestingController);
    // 01:30 on Wednesday 2 December at the depot (America/Chicago), whatever this machine's clock says.
    const now = '2026-12-02T07:30:00.000Z';
    TestBed.inject(Clock).setServerTime(Date.parse(now));
    await signedInAs(mock, ['supervisor']);
    fixture = TestBed.createComponent(PlansPage);
    el = fixture.nativeElement;
    await fixture.whenStable();
    mock.expectNone((r) => r.url.endsWith('/plans'));
    mock.expectOne(`/api/depots/${DEPOT_ID}/night`).flush(depotNight('2026-12-01', now));
    await settle();
    await fixture.whenStable();
    mock.expectOne(`/api/depots/${DEPOT_ID}/plans?serviceDate=2026-12-01`).flush({ plans: [] });
    mock.expectOne(`/api/depots/${DEPOT_ID}`).flush({ depot: { id: DEPOT_ID, chargers: [] } as unknown as DepotDetail });
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
    expect(el.querySelector<HTMLInputElement>('input[type="date"]')?.value).toBe('2026-12-01');
    expect(el.textContent).toContain('December 1');
  });

  it('shows when versions were made and published at the depot, 24-hour', async () => {
    await render(['supervisor']);
    // Made at 20:00 UTC: 14:00 in Chicago.
    const meta = el.querySelector('.review-header .meta')?.textContent?.replace(/\s+/g, ' ') ?? '';
    expect(meta).toMatch(/Generated.*14:00 ·/);
    expect(el.textContent).not.toMatch(/\d{1,2}:\d{2}\s?(AM|PM)/);
  });
});
