import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MatDialogRef } from '@angular/material/dialog';
import { ROLE_LABELS } from '@nightyard/contracts';
import { settle, user } from '../testing/fixtures';
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
    const labels = [...el.querySelectorAll('mat-checkbox')].map((c) => c.textContent?.trim());
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
    expect(req.request.body).toEqual({ name: 'Sam Reyes', email: 'sam@example.org', roles: ['yard'] });
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
});
