import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import type { ActionTokenInfo } from '@nightyard/contracts';
import { settle } from '../testing/fixtures';
import { PASSWORDS_DIFFER } from './password-rules';
import { SetPasswordPage } from './set-password-page';

const TOKEN = 'a'.repeat(43);
const INVITE: ActionTokenInfo = {
  email: 'sam@example.org',
  name: 'Sam Reyes',
  purpose: 'invite',
  expiresAt: '2026-12-09T10:00:00.000Z',
};

describe('SetPasswordPage', () => {
  let fixture: ComponentFixture<SetPasswordPage>;
  let el: HTMLElement;
  let mock: HttpTestingController;

  async function open(answer: (req: ReturnType<HttpTestingController['expectOne']>) => void): Promise<void> {
    fixture = TestBed.createComponent(SetPasswordPage);
    el = fixture.nativeElement;
    fixture.componentRef.setInput('token', TOKEN);
    fixture.detectChanges();
    answer(mock.expectOne(`/api/auth/action-tokens/${TOKEN}`));
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
  }

  function input(label: string): HTMLInputElement {
    const labelEl = [...el.querySelectorAll('label')].find(
      (l) => l.textContent?.trim().replace(/\s*\*$/, '') === label,
    );
    expect(labelEl, `label ${label}`).toBeTruthy();
    return el.querySelector<HTMLInputElement>(`#${labelEl!.getAttribute('for')}`)!;
  }

  function type(field: HTMLInputElement, value: string): void {
    field.value = value;
    field.dispatchEvent(new Event('input'));
    field.dispatchEvent(new Event('blur'));
  }

  async function submit(): Promise<void> {
    [...el.querySelectorAll('button')].find((b) => b.textContent?.trim() === 'Set password')!.click();
    await fixture.whenStable();
    fixture.detectChanges();
  }

  function errors(): string[] {
    return [...el.querySelectorAll('mat-error')].map((e) => e.textContent?.trim() ?? '');
  }

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()],
    });
    mock = TestBed.inject(HttpTestingController);
  });

  afterEach(() => mock.verify());

  it('says whom the invitation is for', async () => {
    await open((req) => req.flush(INVITE));
    expect(el.textContent).toContain('You are invited to Nightyard');
    expect(el.textContent).toContain('Sam Reyes');
    expect(el.textContent).toContain('sam@example.org');
    expect(el.querySelector('h1')?.textContent?.trim()).toBe('Set your password');
  });

  it('says when it is a reset', async () => {
    await open((req) => req.flush({ ...INVITE, purpose: 'reset' }));
    expect(el.textContent).toContain('You asked to reset the password');
  });

  it('shows a mismatch message on the repeat field', async () => {
    await open((req) => req.flush(INVITE));
    type(input('New password'), 'long enough password');
    type(input('Repeat new password'), 'long enough passwort');
    await fixture.whenStable();
    fixture.detectChanges();
    expect(errors()).toEqual([PASSWORDS_DIFFER]);
    await submit();
    mock.expectNone('/api/auth/set-password');
  });

  it('asks for at least 12 characters', async () => {
    await open((req) => req.flush(INVITE));
    type(input('New password'), 'short');
    await submit();
    expect(errors()).toContain('Use at least 12 characters');
    expect(errors()).toContain('Repeat the new password');
  });

  it('sets the password and sends the person to sign in with a success message', async () => {
    await open((req) => req.flush(INVITE));
    const navigate = vi.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);
    type(input('New password'), 'long enough password');
    type(input('Repeat new password'), 'long enough password');
    await submit();
    const req = mock.expectOne('/api/auth/set-password');
    expect(req.request.body).toEqual({ token: TOKEN, password: 'long enough password' });
    req.flush(null, { status: 204, statusText: 'No Content' });
    await settle();
    expect(navigate).toHaveBeenCalledWith(['/sign-in'], { queryParams: { done: 'password-set' } });
  });

  it('an expired link says so and offers a new one', async () => {
    await open((req) =>
      req.flush({ error: { code: 'token_expired', message: 'Expired' } }, { status: 410, statusText: 'Gone' }),
    );
    expect(el.querySelector('[role="alert"]')?.textContent).toContain('This link has expired');
    expect([...el.querySelectorAll('a')].some((a) => a.getAttribute('href') === '/forgot-password')).toBe(true);
    expect(el.querySelector('input')).toBeNull();
  });

  it('the link of a deactivated account says so, not that the link was copied in part', async () => {
    await open((req) =>
      req.flush({ error: { code: 'forbidden', message: 'Deactivated' } }, { status: 403, statusText: 'Forbidden' }),
    );
    const said = el.querySelector('[role="alert"]')?.textContent ?? '';
    expect(said).toContain('This account has been deactivated');
    expect(said).not.toContain('copied only in part');
    expect(el.querySelector('input')).toBeNull();
  });
});
