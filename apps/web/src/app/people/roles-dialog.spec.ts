import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import type { User } from '@nightyard/contracts';
import { DepotListStore } from '../depot-state/depot-list-store';
import { NORTH_ID, SOUTH_ID, depot, settle, southDepot, user } from '../testing/fixtures';
import { RolesDialog } from './roles-dialog';

describe('RolesDialog (roles and depots)', () => {
  let fixture: ComponentFixture<RolesDialog>;
  let el: HTMLElement;
  let mock: HttpTestingController;
  const close = vi.fn();

  async function render(person: User) {
    close.mockReset();
    TestBed.configureTestingModule({
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: MatDialogRef, useValue: { close } },
        { provide: MAT_DIALOG_DATA, useValue: person },
      ],
    });
    mock = TestBed.inject(HttpTestingController);
    const loading = TestBed.inject(DepotListStore).load();
    mock.expectOne('/api/depots').flush({ depots: [depot(), southDepot()], chosenDepotId: null });
    await loading;
    fixture = TestBed.createComponent(RolesDialog);
    el = fixture.nativeElement;
    await fixture.whenStable();
  }

  afterEach(() => mock.verify());

  const box = (scope: string, name: string) =>
    [...el.querySelectorAll(`${scope} mat-checkbox`)]
      .find((c) => c.textContent?.trim() === name)!
      .querySelector('input')!;

  async function save(): Promise<void> {
    [...el.querySelectorAll('button')].find((b) => b.textContent?.trim() === 'Save')!.click();
    await fixture.whenStable();
    fixture.detectChanges();
  }

  it("shows the person's depots ticked and saves the roles with the depots chosen", async () => {
    await render(user({ name: 'Lee Park', roles: ['supervisor'], depotIds: [SOUTH_ID] }));
    expect(el.querySelector('h2')?.textContent).toBe('Roles and depots of Lee Park');
    expect(box('ny-depot-picker', 'Riverside Depot').checked).toBe(true);
    expect(box('ny-depot-picker', 'North Depot').checked).toBe(false);
    box('ny-depot-picker', 'North Depot').click();
    await save();
    const req = mock.expectOne(`/api/users/${user().id}`);
    expect(req.request.method).toBe('PATCH');
    expect(req.request.body).toEqual({ roles: ['supervisor'], depotIds: [NORTH_ID, SOUTH_ID] });
    const saved = user({ roles: ['supervisor'], depotIds: [NORTH_ID, SOUTH_ID] });
    req.flush({ user: saved });
    await settle();
    expect(close).toHaveBeenCalledWith(saved);
  });

  it('makes someone yard staff at one depot only, with the contract message until one is left', async () => {
    await render(user({ name: 'Lee Park', roles: ['supervisor'], depotIds: [NORTH_ID, SOUTH_ID] }));
    box('ny-role-checkboxes', 'Fleet supervisor').click();
    box('ny-role-checkboxes', 'Yard staff').click();
    await save();
    expect(el.querySelector('ny-depot-picker .ny-form-error')?.textContent).toBe(
      'Yard staff work at one depot: choose exactly one',
    );
    mock.expectNone(`/api/users/${user().id}`);
    (el.querySelectorAll('ny-depot-picker mat-radio-button input')[1] as HTMLInputElement).click();
    fixture.detectChanges();
    expect(el.querySelector('ny-depot-picker .ny-form-error')?.textContent).toBe('');
    await save();
    const req = mock.expectOne(`/api/users/${user().id}`);
    expect(req.request.body).toEqual({ roles: ['yard'], depotIds: [SOUTH_ID] });
    req.flush({ user: user({ depotIds: [SOUTH_ID] }) });
    await settle();
  });

  it("shows the API's message about the depots on the depot choice", async () => {
    await render(user({ roles: ['yard'], depotIds: [NORTH_ID] }));
    await save();
    mock.expectOne(`/api/users/${user().id}`).flush(
      {
        error: {
          code: 'validation',
          message: 'Check the depots',
          fields: { depotIds: 'Yard staff work at one depot: choose exactly one' },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
    expect(el.querySelector('ny-depot-picker .ny-form-error')?.textContent).toBe(
      'Yard staff work at one depot: choose exactly one',
    );
    expect(close).not.toHaveBeenCalled();
  });
});
