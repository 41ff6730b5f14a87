import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';

/** The frame of the pages used before signing in: product name, one centred panel. */
@Component({
  selector: 'ny-auth-frame',
  imports: [MatIconModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <header class="bar">
      <span class="brand"><mat-icon class="logo">bedtime</mat-icon>Nightyard</span>
    </header>
    <main id="main" tabindex="-1">
      <section class="panel" aria-labelledby="ny-auth-heading">
        <h1 id="ny-auth-heading">{{ heading() }}</h1>
        <ng-content />
      </section>
    </main>
  `,
  styleUrl: './auth-frame.scss',
})
export class AuthFrame {
  readonly heading = input.required<string>();
}
