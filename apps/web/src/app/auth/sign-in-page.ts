import { ChangeDetectionStrategy, Component, ElementRef, computed, inject, input, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { applyFieldErrors, toApiProblem } from '../core/api-error';
import { AuthFrame } from './auth-frame';
import { AuthStore } from './auth-store';
import { landingUrl } from './return-url';

export const WRONG_CREDENTIALS = 'E-mail or password is not right. Check both and try again.';

const NOTICES: Record<string, string> = {
  'password-set': 'Your password is set. Sign in with it now.',
  'signed-out': 'You are signed out.',
};

@Component({
  selector: 'ny-sign-in-page',
  imports: [
    AuthFrame,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    ReactiveFormsModule,
    RouterLink,
  ],
  templateUrl: './sign-in-page.html',
  styleUrl: './auth-form.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SignInPage {
  private readonly auth = inject(AuthStore);
  private readonly router = inject(Router);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);

  /** Query parameters. */
  readonly returnUrl = input<string>();
  readonly done = input<string>();

  protected readonly notice = computed(() => NOTICES[this.done() ?? ''] ?? null);
  protected readonly form = new FormGroup({
    email: new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.email] }),
    password: new FormControl('', { nonNullable: true, validators: [Validators.required] }),
  });
  protected readonly showPassword = signal(false);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);

  protected async submit(): Promise<void> {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      this.focusFirstInvalid();
      return;
    }
    const { email, password } = this.form.getRawValue();
    this.busy.set(true);
    try {
      await this.auth.signIn(email.trim(), password);
      // A return URL this person's roles cannot open (a link meant for someone else) leads home.
      const target = landingUrl(this.returnUrl(), this.auth.roles(), this.auth.home().path);
      await this.router.navigateByUrl(target);
    } catch (err) {
      const p = toApiProblem(err);
      if (p.status === 401) {
        this.problem.set(WRONG_CREDENTIALS);
      } else if (p.status === 400 && Object.keys(p.fields).length > 0) {
        const rest = applyFieldErrors(this.form, p.fields);
        this.problem.set(rest.length ? rest.join(' ') : p.message);
        this.focusFirstInvalid();
      } else {
        this.problem.set(p.message);
      }
    } finally {
      this.busy.set(false);
    }
  }

  private focusFirstInvalid(): void {
    queueMicrotask(() => {
      const el = this.host.nativeElement.querySelector<HTMLElement>('input.ng-invalid');
      el?.focus();
    });
  }
}
