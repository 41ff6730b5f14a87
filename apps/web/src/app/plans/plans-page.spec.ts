import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatDialog } from '@angular/material/dialog';
import { Router, provideRouter } from '@angular/router';
import type { DepotDetail, Role } from '@nightyard/contracts';
import { of } from 'rxjs';
import { DEPOT_ID, signedInAs } from '../fleet/fleet-fixtures';
import { Clock } from '../core/clock';
import { depotNight, settle } from '../testing/fixtures';
import { PLAN_IDS, planDetail, planSummary, answerAsServiceDays } from './plan-fixtures';
import { AdoptDialog } from './adopt-dialog';
import { PlansPage } from './plans-page';

describe('PlansPage', () => {
  let fixture: ComponentFixture<PlansPage>;
  let el: HTMLElement;
  let mock: HttpTestingController;
  const open = vi.fn();

  const WHAT_IF_ID = '00000000-0000-4000-8000-0000000000f3';
  const whatIf = { id: WHAT_IF_ID, version: 3, kind: 'what-if' as const, createdAt: '2026-12-03T21:00:00.000Z' };

  async function render(roles: Role[], chosen: 'draft' | 'what-if' = 'draft') {
    open.mockReset();
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: MatDialog, useValue: { open } },
      ],
    });
    mock = TestBed.inject(HttpTestingController);
    await signedInAs(mock, roles);
    fixture = TestBed.createComponent(PlansPage);
    fixture.componentRef.setInput('date', '2026-12-03');
    const selected = chosen === 'draft' ? PLAN_IDS.draft : WHAT_IF_ID;
    fixture.componentRef.setInput('plan', selected);
    el = fixture.nativeElement;
    await stable();
    mock.expectOne(`/api/depots/${DEPOT_ID}/plans?serviceDate=2026-12-03`).flush({
      plans: [
        ...(chosen === 'what-if' ? [planSummary(whatIf)] : []),
        planSummary(),
        planSummary({
          id: PLAN_IDS.published,
          version: 1,
          state: 'published',
          publishedAt: '2026-12-03T19:00:00.000Z',
        }),
      ],
    });
    mock.expectOne(`/api/depots/${DEPOT_ID}`).flush({
      depot: {
        id: DEPOT_ID,
        chargers: [
          { label: 'C1', maxKw: 60, status: 'in_service' },
          { label: 'C2', maxKw: 30, status: 'in_service' },
        ],
      } as DepotDetail,
    });
    await settle();
    await stable();
    mock.expectOne(`/api/plans/${selected}`).flush({ plan: chosen === 'draft' ? planDetail() : planDetail(whatIf) });
    await settle();
    await stable();
    fixture.detectChanges();
    for (const req of mock.match((r) => r.url.endsWith('/compare'))) {
      req.flush({
        from: { id: PLAN_IDS.published, version: 1, kind: 'generated' },
        to: { id: selected, version: 2, kind: 'generated' },
        moved: [],
        costChange: 0,
        inputChanges: [],
      });
    }
    await stable();
    fixture.detectChanges();
  }

  afterEach(() => {
    answerAsServiceDays(mock);
    mock.verify();
  });

  /** Runs change detection and the resources' loaders; never waits for an unanswered request (whenStable would). */
  async function stable() {
    TestBed.tick();
    await settle();
    TestBed.tick();
    await settle();
  }

  const button = (label: string) =>
    [...el.querySelectorAll('button')].find((b) => b.textContent?.replace(/\s+/g, ' ').trim().endsWith(label)) ?? null;

  it('shows a day without runs as part of the night before it: no Generate, a way there, steps by service day', async () => {
    TestBed.configureTestingModule({ providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()] });
    mock = TestBed.inject(HttpTestingController);
    await signedInAs(mock, ['supervisor']);
    const router = TestBed.inject(Router);
    const go = vi.spyOn(router, 'navigate').mockResolvedValue(true);
    fixture = TestBed.createComponent(PlansPage);
    fixture.componentRef.setInput('date', '2026-12-05');
    el = fixture.nativeElement;
    await stable();
    mock.expectOne(`/api/depots/${DEPOT_ID}/plans?serviceDate=2026-12-05`).flush({ plans: [] });
    mock.expectOne(`/api/depots/${DEPOT_ID}/nights/2026-12-05`).flush({
      date: '2026-12-05',
      serviceDay: false,
      within: '2026-12-04',
      previous: '2026-12-04',
      next: '2026-12-07',
    });
    for (const req of mock.match(`/api/depots/${DEPOT_ID}`)) req.flush({ depot: { id: DEPOT_ID, chargers: [] } });
    await stable();
    fixture.detectChanges();
    const hint = el.querySelector('.hint.within')!.textContent!.replace(/\s+/g, ' ');
    expect(hint).toContain(
      'No runs on Saturday, December 5, 2026: it falls inside the night of Friday, December 4, 2026',
    );
    expect(button('Generate plan')!.disabled).toBe(true);
    const query = () => go.mock.calls.at(-1)![1]!.queryParams;
    button('Go to the night of Friday, December 4, 2026')!.click();
    expect(query()).toMatchObject({ date: '2026-12-04' });
    // Next night: Monday, the next service day, not Sunday.
    (el.querySelector('button[aria-label="Next night"]') as HTMLButtonElement).click();
    expect(query()).toMatchObject({ date: '2026-12-07' });
  });

  it('shows the chosen draft with its timeline and short buses first', async () => {
    await render(['supervisor']);
    expect(el.querySelector('#review-heading')?.textContent).toContain('Version 2');
    expect(el.querySelector('ny-charger-timeline')).not.toBeNull();
    const first = el.querySelector('ny-bus-plan-table tbody tr')?.textContent;
    expect(first).toContain('203');
    expect(first).toContain('Site service limit');
    expect([...el.querySelectorAll('.version-list a')].map((a) => a.getAttribute('aria-current'))).toEqual([
      'true',
      null,
    ]);
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
          code: 'published_meanwhile',
          message:
            'Version 3 was published by Tomasz Greer at 21:04 UTC while you were reviewing: compare with it, then publish again',
        },
      },
      { status: 409, statusText: 'Conflict' },
    );
    await settle();
    await stable();
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
    for (const label of ['Generate plan', 'Publish', 'Upload what-if', 'Download scenario'])
      expect(button(label)).toBeNull();
    expect(el.querySelector('input[type="file"]')).toBeNull();
    expect(el.querySelector('ny-bus-plan-table')).not.toBeNull();
  });

  it('labels a what-if as such in the versions and the review: no Publish, Adopt instead', async () => {
    await render(['supervisor'], 'what-if');
    const labels = [...el.querySelectorAll('.version-list .state')].map((x) => x.textContent?.trim());
    expect(labels).toEqual(['What-if', 'Draft', 'Published']);
    expect(el.querySelector('#review-heading')?.textContent?.replace(/\s+/g, ' ').trim()).toBe('Version 3 What-if');
    expect(el.querySelector('.study[role="note"]')?.textContent).toContain(
      'never published, e-mailed or sent to chargers',
    );
    expect(button('Publish')).toBeNull();
    expect(button('Adopt')).not.toBeNull();
  });

  it('adopts a what-if: lists the differences before, then opens the new draft with them', async () => {
    await render(['supervisor'], 'what-if');
    const differences = [
      'Service limit in the study 150 kW, depot now 400 kW',
      'Charger C3 out of service now: left out',
    ];
    const adoption = {
      whatIf: { id: WHAT_IF_ID, version: 3 },
      serviceDate: '2026-12-03',
      includesMidday: true,
      differences,
    };
    open.mockReturnValue({ afterClosed: () => of(true) });
    button('Adopt')!.click();
    await settle();
    mock.expectOne(`/api/plans/${WHAT_IF_ID}/adoption`).flush(adoption);
    await settle();
    const [component, config] = open.mock.calls[0]!;
    expect(component).toBe(AdoptDialog);
    expect(config.data.adoption.differences).toEqual(differences);
    const req = mock.expectOne(`/api/plans/${WHAT_IF_ID}/adopt`);
    expect(req.request.method).toBe('POST');
    const draft = planSummary({
      id: '00000000-0000-4000-8000-0000000000f4',
      version: 4,
      status: 'queued',
      stage: 'Waiting for a worker',
      totalCost: null,
      shortBuses: null,
    });
    req.flush({ plan: draft, adoption });
    await settle();
    fixture.componentRef.setInput('plan', draft.id);
    await stable();
    mock.expectOne(`/api/plans/${draft.id}`).flush({ plan: planDetail({ ...draft, result: null }) });
    await settle();
    fixture.detectChanges();
    expect(el.querySelector('#review-heading')?.textContent?.replace(/\s+/g, ' ').trim()).toBe('Version 4 Draft');
    const banner = el.querySelector('.study[aria-label="Adopted from a what-if"]')?.textContent ?? '';
    expect(banner).toContain(
      'Adopted from what-if version 3, re-checked against the depot as it is now: 2 differences',
    );
    expect(banner).toContain('Charger C3 out of service now');
  });

  it('shows why a what-if cannot be adopted, and asks nothing', async () => {
    await render(['supervisor'], 'what-if');
    button('Adopt')!.click();
    await settle();
    mock.expectOne(`/api/plans/${WHAT_IF_ID}/adoption`).flush(
      {
        error: {
          code: 'conflict',
          message: 'The night of Thursday, December 3, 2026 has ended: what-if version 3 can no longer be adopted.',
        },
      },
      { status: 409, statusText: 'Conflict' },
    );
    await settle();
    fixture.detectChanges();
    expect(open).not.toHaveBeenCalled();
    mock.expectNone(`/api/plans/${WHAT_IF_ID}/adopt`);
    expect(el.querySelector('ny-problem-summary')?.textContent).toContain(
      'Not adopted. The night of Thursday, December 3, 2026 has ended',
    );
  });

  it('shows finance the what-if label but no Adopt', async () => {
    await render(['finance'], 'what-if');
    expect(el.querySelector('.review-header .state')?.textContent?.trim()).toBe('What-if');
    expect(button('Adopt')).toBeNull();
  });

  it("opens on tonight as the server says: after midnight that is the night before the depot's date", async () => {
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: MatDialog, useValue: { open } },
      ],
    });
    mock = TestBed.inject(HttpTestingController);
    // 01:30 on Wednesday 2 December at the depot (America/Chicago), whatever this machine's clock says.
    const now = '2026-12-02T07:30:00.000Z';
    TestBed.inject(Clock).setServerTime(Date.parse(now));
    await signedInAs(mock, ['supervisor']);
    fixture = TestBed.createComponent(PlansPage);
    el = fixture.nativeElement;
    await stable();
    mock.expectNone((r) => r.url.endsWith('/plans'));
    mock.expectOne(`/api/depots/${DEPOT_ID}/night`).flush(depotNight('2026-12-01', now));
    await settle();
    await stable();
    mock.expectOne(`/api/depots/${DEPOT_ID}/plans?serviceDate=2026-12-01`).flush({ plans: [] });
    mock
      .expectOne(`/api/depots/${DEPOT_ID}`)
      .flush({ depot: { id: DEPOT_ID, chargers: [] } as unknown as DepotDetail });
    await settle();
    await stable();
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
