import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { RouterLink } from '@angular/router';
import { AuthStore } from '../auth/auth-store';

@Component({
  selector: 'ny-not-found-page',
  imports: [MatButtonModule, RouterLink],
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
  template: `
    <h1>Page not found</h1>
    <p class="ny-lead">There is no page at this address.</p>
    <p>
      <a mat-flat-button [routerLink]="home().path">Go to {{ home().label }}</a>
    </p>
  `,
})
export class NotFoundPage {
  protected readonly home = inject(AuthStore).home;
}
