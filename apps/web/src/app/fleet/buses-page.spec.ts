import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatDialog } from '@angular/material/dialog';
import { provideRouter } from '@angular/router';
import type { Role } from '@nightyard/contracts';
import { settle } from '../testing/fixtures';
import { BusesPage, sortBuses } from './buses-page';
import { DEPOT_ID, bus, signedInAs } from './fleet-fixtures';

const FLEET = [
  bus({ id: '00000000-0000-4000-8000-0000000000b3', number: '1001', usableKwh: 155, status: 'out_of_service' }),
  bus({ id: '00000000-0000-4000-8000-0000000000b1', number: '201', usableKwh: 196 }),
  bus({ id: '00000000-0000-4000-8000-0000000000b2', number: '202', usableKwh: 155, taperStartPct: null }),
];

describe('BusesPage', () => {
  let fixture: ComponentFixture<BusesPage>;
  let el: HTMLElement;
  let mock: HttpTestingController;
  const open = vi.fn();

  async function render(roles: Role[]) {
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
    fixture = TestBed.createComponent(BusesPage);
    el = fixture.nativeElement;
    await settle();
    mock.expectOne(`/api/depots/${DEPOT_ID}/buses`).flush({ buses: FLEET });
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
  }

  afterEach(() => mock.verify());

  const numbers = () => [...el.querySelectorAll('tr[mat-row] td:first-child')].map((td) => td.textContent?.trim());

  it('lists the buses by number (201 before 1001) with edit buttons for a supervisor', async () => {
    await render(['supervisor']);
    expect(numbers()).toEqual(['201', '202', '1001']);
    expect([...el.querySelectorAll('button')].some((b) => b.textContent?.includes('Add bus'))).toBe(true);
    expect(el.querySelectorAll('button[aria-label^="Edit bus"]').length).toBe(3);
    expect(el.textContent).toContain('3 buses, 2 in service');
  });

  it('sorts by a column heading', async () => {
    await render(['admin']);
    const header = [...el.querySelectorAll('th[mat-header-cell]')].find((th) =>
      th.textContent?.includes('Usable kWh'),
    )!;
    (header.querySelector('.mat-sort-header-container') as HTMLElement | null)?.click();
    await fixture.whenStable();
    fixture.detectChanges();
    expect(numbers()).toEqual(['202', '1001', '201']);
    expect(sortBuses(FLEET, { active: 'taperStartPct', direction: 'asc' }).map((b) => b.number)).toEqual([
      '201',
      '1001',
      '202',
    ]);
  });

  it('is read-only for facilities and finance: no add or edit controls', async () => {
    await render(['facilities', 'finance']);
    expect(numbers()).toEqual(['201', '202', '1001']);
    expect(el.textContent).toContain('You can read the fleet');
    expect([...el.querySelectorAll('button')].some((b) => b.textContent?.includes('Add bus'))).toBe(false);
    expect(el.querySelectorAll('button[aria-label^="Edit bus"]').length).toBe(0);
  });
});
