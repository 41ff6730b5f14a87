import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatDialogRef } from '@angular/material/dialog';
import { ROLE_LABELS } from '@nightyard/contracts';
import { DepotListStore } from '../depot-state/depot-list-store';
import { NORTH_ID, SOUTH_ID, depot, settle, southDepot, user } from '../testing/fixtures';
import { InviteDialog } from './invite-dialog';

describe('InviteDialog', () => {
  let fixture: ComponentFixture<InviteDialog>;
  let el: HTMLElement;
  let mock: HttpTestingController;
  const close = vi.fn();

  beforeEach(async () => {
    close.mockReset();
    TestBed.configureTestingModule({
      providers: [provideHttpClient(), provideHttpClientTesting(), { provide: MatDialogRef, useValue: { close } }],
    });
    mock = TestBed.inject(HttpTestingController);
    const loading = TestBed.inject(DepotListStore).load();
    mock.expectOne('/api/depots').flush({ depots: [depot(), southDepot()], chosenDepotId: NORTH_ID });
    await loading;
    fixture = TestBed.createComponent(InviteDialog);
    el = fixture.nativeElement;
    await fixture.whenStable();
  });

  afterEach(() => mock.verify());

  function input(label: string): HTMLInputElement {
    const labelEl = [...el.querySelectorAll('label')].find(
      (l) => l.textContent?.trim().replace(/\s*\*$/, '') === label,
    );
    return el.querySelector<HTMLInputElement>(`#${labelEl!.getAttribute('for')}`)!;
  }

  function type(field: HTMLInputElement, value: string): void {
    field.value = value;
    field.dispatchEvent(new Event('input'));
    field.dispatchEvent(new Event('blur'));
  }

  async function send(): Promise<void> {
    [...el.querySelectorAll('button')].find((b) => b.textContent?.trim() === 'Send invitation')!.click();
    await fixture.whenStable();
    fixture.detectChanges();
  }

  function checkbox(label: string): HTMLInputElement {
    const box = [...el.querySelectorAll('mat-checkbox')].find((c) => c.textContent?.trim() === label)!;
    return box.querySelector('input')!;
  }

  it('offers one checkbox per role, named by ROLE_LABELS', () => {
    const labels = [...el.querySelectorAll('ny-role-checkboxes mat-checkbox')].map((c) => c.textContent?.trim());
    expect(labels).toEqual(Object.values(ROLE_LABELS));
    expect(el.querySelector('legend')?.textContent).toBe('Roles');
  });

  it('asks for a name, an e-mail and at least one role', async () => {
    await send();
    expect(el.textContent).toContain("Enter the person's name");
    expect(el.textContent).toContain('Enter their e-mail address');
    expect(el.textContent).toContain('Choose at least one role');
    mock.expectNone('/api/users/invite');
  });

  it('sends the invitation and closes with the new person', async () => {
    type(input('Name'), 'Sam Reyes');
    type(input('E-mail'), 'sam@example.org');
    checkbox('Yard staff').click();
    await send();
    const req = mock.expectOne('/api/users/invite');
    // The inviter's depot is where they start from.
    expect(req.request.body).toEqual({
      name: 'Sam Reyes',
      email: 'sam@example.org',
      roles: ['yard'],
      depotIds: [NORTH_ID],
    });
    const invited = user({ status: 'invited' });
    req.flush({ user: invited }, { status: 201, statusText: 'Created' });
    await settle();
    expect(close).toHaveBeenCalledWith(invited);
  });

  it('shows the API field errors on their fields', async () => {
    type(input('Name'), 'Sam Reyes');
    type(input('E-mail'), 'sam@example.org');
    checkbox('Finance').click();
    await send();
    mock.expectOne('/api/users/invite').flush(
      {
        error: {
          code: 'conflict',
          message: 'Someone already has that address',
          fields: { email: 'Someone in your organisation already uses this e-mail' },
        },
      },
      { status: 409, statusText: 'Conflict' },
    );
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
    expect([...el.querySelectorAll('mat-error')].map((e) => e.textContent?.trim())).toEqual([
      'Someone in your organisation already uses this e-mail',
    ]);
    expect(close).not.toHaveBeenCalled();
  });

  const radios = () => [...el.querySelectorAll('mat-radio-button')].map((r) => r.textContent?.trim());
  const boxes = () =>
    [...el.querySelectorAll('ny-depot-picker mat-checkbox')].map((c) => [
      c.textContent?.trim(),
      c.querySelector('input')!.checked,
    ]);
  function depotBox(name: string): HTMLInputElement {
    return [...el.querySelectorAll('ny-depot-picker mat-checkbox')]
      .find((c) => c.textContent?.trim() === name)!
      .querySelector('input')!;
  }

  it("lets yard staff work at one depot only, chosen from the organisation's", async () => {
    type(input('Name'), 'Sam Reyes');
    type(input('E-mail'), 'sam@example.org');
    checkbox('Yard staff').click();
    fixture.detectChanges();
    await fixture.whenStable();
    expect(radios()).toEqual(['North Depot', 'Riverside Depot']);
    expect(boxes()).toEqual([]);
    expect(el.querySelector('ny-depot-picker')!.textContent).toContain('Yard staff work at one depot and see only it.');
    (el.querySelectorAll('mat-radio-button input')[1] as HTMLInputElement).click();
    await send();
    const req = mock.expectOne('/api/users/invite');
    expect(req.request.body.depotIds).toEqual([SOUTH_ID]);
    req.flush({ user: user({ depotIds: [SOUTH_ID] }) }, { status: 201, statusText: 'Created' });
    await settle();
  });

  it('gives a supervisor several depots, and asks for one when none is ticked', async () => {
    type(input('Name'), 'Lee Park');
    type(input('E-mail'), 'lee@example.org');
    checkbox('Fleet supervisor').click();
    fixture.detectChanges();
    await fixture.whenStable();
    expect(boxes()).toEqual([
      ['North Depot', true],
      ['Riverside Depot', false],
    ]);
    depotBox('North Depot').click();
    await send();
    expect(el.querySelector('ny-depot-picker .ny-form-error')!.textContent).toBe('Choose at least one depot');
    mock.expectNone('/api/users/invite');

    depotBox('Riverside Depot').click();
    depotBox('North Depot').click();
    fixture.detectChanges();
    expect(el.querySelector('ny-depot-picker .ny-form-error')!.textContent).toBe('');
    await send();
    const req = mock.expectOne('/api/users/invite');
    expect(req.request.body.depotIds).toEqual([NORTH_ID, SOUTH_ID]);
    req.flush({ user: user() }, { status: 201, statusText: 'Created' });
    await settle();
  });

  it("gives the contract's message when someone made yard staff still holds two depots", async () => {
    type(input('Name'), 'Lee Park');
    type(input('E-mail'), 'lee@example.org');
    checkbox('Fleet supervisor').click();
    fixture.detectChanges();
    depotBox('Riverside Depot').click();
    checkbox('Fleet supervisor').click();
    checkbox('Yard staff').click();
    await send();
    expect(el.querySelector('ny-depot-picker .ny-form-error')!.textContent).toBe(
      'Yard staff work at one depot: choose exactly one',
    );
    mock.expectNone('/api/users/invite');
  });
});
