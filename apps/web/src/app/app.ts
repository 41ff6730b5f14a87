import { ChangeDetectionStrategy, Component, DOCUMENT, inject } from '@angular/core';
import { RouterOutlet } from '@angular/router';
import { ThemeStore } from './core/theme-store';

@Component({
  selector: 'ny-root',
  imports: [RouterOutlet],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <a class="ny-skip-link" href="#main" (click)="skipToMain($event)">Skip to main content</a>
    <router-outlet />
  `,
})
export class App {
  private readonly document = inject(DOCUMENT);

  constructor() {
    // Apply the stored light/dark choice before the first page paints.
    inject(ThemeStore);
  }

  protected skipToMain(event: Event): void {
    const main = this.document.getElementById('main');
    if (!main) return;
    event.preventDefault();
    main.focus();
    main.scrollIntoView();
  }
}
