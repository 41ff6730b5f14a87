import {
  ChangeDetectionStrategy,
  Component,
  ElementRef,
  computed,
  inject,
  input,
  signal,
  type OnInit,
} from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import type { ActionTokenInfo } from '@nightyard/contracts';
import { toApiProblem } from '../core/api-error';
import { AuthFrame } from './auth-frame';
import { AuthStore } from './auth-store';
import {
  PASSWORD_MAX_LENGTH,
  PASSWORD_MIN_LENGTH,
  PASSWORDS_DIFFER,
  RepeatPasswordMatcher,
  samePasswords,
} from './password-rules';

type LinkState =
  | { kind: 'checking' }
  | { kind: 'ready'; info: ActionTokenInfo }
  | { kind: 'expired'; message: string }
  | { kind: 'invalid'; message: string }
  | { kind: 'failed'; message: string };

@Component({
  selector: 'ny-set-password-page',
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
  templateUrl: './set-password-page.html',
  styleUrl: './auth-form.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SetPasswordPage implements OnInit {
  private readonly auth = inject(AuthStore);
  private readonly router = inject(Router);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);

  /** Query parameter from the e-mailed link. */
  readonly token = input<string>();

  protected readonly minLength = PASSWORD_MIN_LENGTH;
  protected readonly differ = PASSWORDS_DIFFER;
  protected readonly link = signal<LinkState>({ kind: 'checking' });
  protected readonly info = computed(() => {
    const state = this.link();
    return state.kind === 'ready' ? state.info : null;
  });
  protected readonly linkMessage = computed(() => {
    const state = this.link();
    return 'message' in state ? state.message : null;
  });
  protected readonly heading = computed(() => {
    const state = this.link();
    if (state.kind === 'ready' && state.info.purpose === 'reset') return 'Choose a new password';
    if (state.kind === 'ready') return 'Set your password';
    return 'Set password';
  });
  protected readonly form = new FormGroup(
    {
      password: new FormControl('', {
        nonNullable: true,
        validators: [
          Validators.required,
          Validators.minLength(PASSWORD_MIN_LENGTH),
          Validators.maxLength(PASSWORD_MAX_LENGTH),
        ],
      }),
      confirm: new FormControl('', { nonNullable: true, validators: [Validators.required] }),
    },
    { validators: samePasswords },
  );
  protected readonly repeatMatcher = new RepeatPasswordMatcher();
  protected readonly showPassword = signal(false);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);

  async ngOnInit(): Promise<void> {
    const token = this.token();
    if (!token) {
      this.link.set({
        kind: 'invalid',
        message: 'This address has no link code. Open the link from the e-mail again.',
      });
      return;
    }
    try {
      this.link.set({ kind: 'ready', info: await this.auth.lookUpLink(token) });
    } catch (err) {
      this.link.set(this.linkProblem(err));
    }
  }

  protected async submit(): Promise<void> {
    this.problem.set(null);
    const token = this.token();
    if (this.form.invalid || !token) {
      this.form.markAllAsTouched();
      queueMicrotask(() =>
        this.host.nativeElement.querySelector<HTMLElement>('input.ng-invalid, input[aria-invalid="true"]')?.focus(),
      );
      return;
    }
    this.busy.set(true);
    try {
      await this.auth.setPassword(token, this.form.getRawValue().password);
      await this.router.navigate(['/sign-in'], { queryParams: { done: 'password-set' } });
    } catch (err) {
      const p = toApiProblem(err);
      if (p.status === 400 && p.fields['password']) {
        this.form.controls.password.setErrors({ server: p.fields['password'] });
      } else if (p.status === 403 || p.status === 404 || p.status === 410 || p.code === 'token_expired') {
        this.link.set(this.linkProblem(err));
      } else {
        this.problem.set(p.message);
      }
    } finally {
      this.busy.set(false);
    }
  }

  private linkProblem(err: unknown): LinkState {
    const p = toApiProblem(err);
    if (p.status === 410 || p.code === 'token_expired') {
      return { kind: 'expired', message: 'This link has expired. Links work for a limited time, and each works once.' };
    }
    if (p.status === 403) {
      return {
        kind: 'invalid',
        message:
          'This account has been deactivated, so its link no longer works. Ask your administrator to reactivate it and send a new link.',
      };
    }
    if (p.status === 404 || p.status === 400) {
      return {
        kind: 'invalid',
        message: 'This link is not valid. It may have been used already, or copied only in part.',
      };
    }
    return { kind: 'failed', message: p.message };
  }
}
