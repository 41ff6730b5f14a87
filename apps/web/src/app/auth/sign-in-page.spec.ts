import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import { settle, tokenResponse } from '../testing/fixtures';
import { SignInPage, WRONG_CREDENTIALS } from './sign-in-page';

describe('SignInPage', () => {
  let fixture: ComponentFixture<SignInPage>;
  let el: HTMLElement;
  let mock: HttpTestingController;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()],
    });
    mock = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(SignInPage);
    el = fixture.nativeElement;
    await fixture.whenStable();
  });

  afterEach(() => mock.verify());

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

  function submitButton(): HTMLButtonElement {
    return [...el.querySelectorAll('button')].find((b) => b.textContent?.trim() === 'Sign in')!;
  }

  async function submit(): Promise<void> {
    submitButton().click();
    await fixture.whenStable();
    fixture.detectChanges();
  }

  function errors(): string[] {
    return [...el.querySelectorAll('mat-error')].map((e) => e.textContent?.trim() ?? '');
  }

  it('has the heading, labelled fields and the forgot-password link', () => {
    expect(el.querySelector('h1')?.textContent?.trim()).toBe('Sign in to Nightyard');
    expect(input('E-mail').type).toBe('email');
    expect(input('Password').type).toBe('password');
    expect([...el.querySelectorAll('a')].some((a) => a.textContent?.trim() === 'Forgot password?')).toBe(true);
  });

  it('says what is missing when the empty form is sent, without calling the server', async () => {
    await submit();
    expect(errors()).toEqual(['Enter your e-mail address', 'Enter your password']);
    mock.expectNone('/api/auth/login');
  });

  it('asks for a real e-mail address', async () => {
    type(input('E-mail'), 'not-an-address');
    await fixture.whenStable();
    fixture.detectChanges();
    expect(errors()).toEqual(['Enter an e-mail address such as name@example.org']);
  });

  it('the show-characters toggle reveals the password', async () => {
    const toggle = el.querySelector<HTMLButtonElement>('button[aria-label="Show characters"]')!;
    expect(toggle.getAttribute('aria-pressed')).toBe('false');
    toggle.click();
    await fixture.whenStable();
    fixture.detectChanges();
    expect(input('Password').type).toBe('text');
    expect(toggle.getAttribute('aria-pressed')).toBe('true');
  });

  it('a wrong password gives one plain message in the live region', async () => {
    type(input('E-mail'), 'ada@example.org');
    type(input('Password'), 'wrong password');
    await submit();
    mock
      .expectOne('/api/auth/login')
      .flush({ error: { code: 'unauthenticated', message: 'x' } }, { status: 401, statusText: 'Unauthorized' });
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
    const live = el.querySelector('[aria-live="assertive"]')!;
    expect(live.textContent).toContain(WRONG_CREDENTIALS);
  });

  it('too many attempts shows the server message', async () => {
    type(input('E-mail'), 'ada@example.org');
    type(input('Password'), 'pw');
    await submit();
    mock
      .expectOne('/api/auth/login')
      .flush(
        { error: { code: 'too_many_requests', message: 'Too many attempts. Try again in 10 minutes.' } },
        { status: 429, statusText: 'Too Many Requests' },
      );
    await settle();
    await fixture.whenStable();
    fixture.detectChanges();
    expect(el.querySelector('[aria-live="assertive"]')!.textContent).toContain('Try again in 10 minutes.');
  });

  it('goes to the return address after signing in', async () => {
    const router = TestBed.inject(Router);
    const go = vi.spyOn(router, 'navigateByUrl').mockResolvedValue(true);
    fixture.componentRef.setInput('returnUrl', '/people/outbox');
    type(input('E-mail'), 'ada@example.org');
    type(input('Password'), 'right password');
    await submit();
    mock.expectOne('/api/auth/login').flush(tokenResponse(['admin']));
    await settle();
    expect(go).toHaveBeenCalledWith('/people/outbox');
  });

  it('goes to the role home when there is no (or an unsafe) return address', async () => {
    const router = TestBed.inject(Router);
    const go = vi.spyOn(router, 'navigateByUrl').mockResolvedValue(true);
    fixture.componentRef.setInput('returnUrl', '//evil.example/x');
    type(input('E-mail'), 'ada@example.org');
    type(input('Password'), 'right password');
    await submit();
    mock.expectOne('/api/auth/login').flush(tokenResponse(['yard']));
    await settle();
    expect(go).toHaveBeenCalledWith('/yard');
  });
});
