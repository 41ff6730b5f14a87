import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { RouterLink } from '@angular/router';
import { ROLE_LABELS, SECTIONS } from '@nightyard/contracts';
import { AuthStore } from '../auth/auth-store';

/** Shown (address unchanged) when someone opens a section their roles do not include. */
@Component({
  selector: 'ny-not-available-page',
  imports: [MatButtonModule, RouterLink],
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
  template: `
    <h1>Not available for your role</h1>
    @if (target(); as s) {
      <p class="ny-lead">{{ s.label }} is open to: {{ allowed() }}.</p>
    } @else {
      <p class="ny-lead">This page is not open to your roles.</p>
    }
    <p>You are signed in as {{ mine() }}. An administrator can change your roles.</p>
    <a mat-flat-button [routerLink]="home().path">Go to {{ home().label }}</a>
  `,
  styles: `
    p {
      max-width: 60ch;
    }
  `,
})
export class NotAvailablePage {
  private readonly auth = inject(AuthStore);
  /** The section that was asked for (query parameter). */
  readonly section = input<string>();

  protected readonly target = computed(() => SECTIONS.find((s) => s.key === this.section()) ?? null);
  protected readonly allowed = computed(() => (this.target()?.roles ?? []).map((r) => ROLE_LABELS[r]).join(', '));
  protected readonly mine = computed(
    () =>
      this.auth
        .roles()
        .map((r) => ROLE_LABELS[r])
        .join(', ') || 'no role',
  );
  protected readonly home = this.auth.home;
}
