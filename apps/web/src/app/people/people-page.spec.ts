import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatDialog } from '@angular/material/dialog';
import { provideRouter } from '@angular/router';
import { of } from 'rxjs';
import { NORTH_ID, SOUTH_ID, depot, settle, southDepot, user } from '../testing/fixtures';
import { PeoplePage } from './people-page';

describe('PeoplePage', () => {
  let fixture: ComponentFixture<PeoplePage>;
  let el: HTMLElement;
  let mock: HttpTestingController;
  const open = vi.fn();

  beforeEach(async () => {
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
    fixture = TestBed.createComponent(PeoplePage);
    el = fixture.nativeElement;
    mock.expectOne('/api/depots').flush({ depots: [depot(), southDepot()], chosenDepotId: null });
    mock.expectOne('/api/users').flush({
      users: [
        user({
          name: 'Zoe Adler',
          email: 'zoe@example.org',
          roles: ['admin', 'finance'],
          lastSignInAt: '2026-11-30T08:00:00Z',
        }),
        user({
          id: '00000000-0000-4000-8000-000000000003',
          name: 'Ben Ito',
          email: 'ben@example.org',
          status: 'invited',
        }),
        user({
          id: '00000000-0000-4000-8000-000000000004',
          name: 'Lee Park',
          email: 'lee@example.org',
          roles: ['supervisor'],
          depotIds: [SOUTH_ID, NORTH_ID],
        }),
      ],
    });
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
  });

  afterEach(() => mock.verify());

  it('lists people by name with roles, status and last sign-in', () => {
    const rows = [...el.querySelectorAll('tr[mat-row]')].map((r) => r.textContent?.replace(/\s+/g, ' ').trim());
    expect(rows).toHaveLength(3);
    expect(rows[0]).toContain('Ben Ito');
    expect(rows[0]).toContain('Invited');
    expect(rows[0]).toContain('Never');
    expect(rows[2]).toContain('Zoe Adler');
    expect(rows[2]).toContain('Administrator');
    expect(rows[2]).toContain('Finance');
    expect(el.querySelector('h1')?.textContent?.trim()).toBe('People');
    expect([...el.querySelectorAll('a')].some((a) => a.textContent?.trim().endsWith('Outbox'))).toBe(true);
  });

  it("shows each person's depots by name; administrators see all of them", () => {
    const depotCells = [...el.querySelectorAll('tr[mat-row]')].map((r) => [
      r.querySelector('td')?.textContent?.trim(),
      r.querySelector('td.depots')?.textContent?.replace(/\s+/g, ' ').replace(/ ,/g, ',').trim(),
    ]);
    expect(depotCells).toEqual([
      ['Ben Ito', 'North Depot'],
      ['Lee Park', 'North Depot, Riverside Depot'],
      ['Zoe Adler', 'Every depot'],
    ]);
  });

  it('deactivates someone only after the confirm dialog says yes, then confirms', async () => {
    open.mockReturnValue({ afterClosed: () => of(true) });
    const page = fixture.componentInstance as unknown as { setActive(u: ReturnType<typeof user>, a: boolean): void };
    const ben = user({ id: '00000000-0000-4000-8000-000000000003', name: 'Ben Ito', status: 'invited' });
    page.setActive(ben, false);
    expect(open.mock.calls[0]![1].data.confirm).toBe('Deactivate');
    const req = mock.expectOne(`/api/users/${ben.id}`);
    expect(req.request.method).toBe('PATCH');
    expect(req.request.body).toEqual({ active: false });
    req.flush({ user: { ...ben, status: 'deactivated' } });
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
    expect(el.textContent).toContain('Deactivated');
  });

  it('does nothing when the confirm dialog is cancelled', () => {
    open.mockReturnValue({ afterClosed: () => of(false) });
    const page = fixture.componentInstance as unknown as { setActive(u: ReturnType<typeof user>, a: boolean): void };
    page.setActive(user(), false);
    mock.expectNone(() => true);
  });
});
