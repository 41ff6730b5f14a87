import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { toApiProblem } from '../core/api-error';
import { AuthFrame } from './auth-frame';
import { AuthStore } from './auth-store';

@Component({
  selector: 'ny-forgot-password-page',
  imports: [
    AuthFrame,
    MatButtonModule,
    MatFormFieldModule,
    MatInputModule,
    MatProgressBarModule,
    ReactiveFormsModule,
    RouterLink,
  ],
  templateUrl: './forgot-password-page.html',
  styleUrl: './auth-form.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ForgotPasswordPage {
  private readonly auth = inject(AuthStore);

  protected readonly form = new FormGroup({
    email: new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.email] }),
  });
  protected readonly busy = signal(false);
  protected readonly sentTo = signal<string | null>(null);
  protected readonly problem = signal<string | null>(null);

  protected async submit(): Promise<void> {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const email = this.form.getRawValue().email.trim();
    this.busy.set(true);
    try {
      await this.auth.requestReset(email);
      this.sentTo.set(email);
    } catch (err) {
      const p = toApiProblem(err);
      if (p.status === 400 && p.fields['email']) {
        this.form.controls.email.setErrors({ server: p.fields['email'] });
      } else {
        this.problem.set(p.message);
      }
    } finally {
      this.busy.set(false);
    }
  }
}
