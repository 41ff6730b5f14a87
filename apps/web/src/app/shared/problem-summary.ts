import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';

/** One line of a problem list: where (a line, row or field, in words) and what to fix. */
export interface ProblemItem {
  where: string;
  message: string;
}

/**
 * What went wrong with a save or an upload, read out as it appears (aria-live): the API's message
 * and the problems no visible control shows, each naming where. Used across sections.
 */
@Component({
  selector: 'ny-problem-summary',
  imports: [MatIconModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <div aria-live="assertive" aria-atomic="true">
      @if (message() || items().length) {
        <div class="box">
          <mat-icon aria-hidden="true">error</mat-icon>
          <div class="body">
            @if (message()) {
              <p class="message">{{ message() }}</p>
            }
            @if (items().length) {
              <ul [attr.aria-label]="label()">
                @for (item of items(); track $index) {
                  <li>
                    @if (item.where) {
                      <strong>{{ item.where }}:</strong>
                    }
                    {{ item.message }}
                  </li>
                }
              </ul>
            }
          </div>
        </div>
      }
    </div>
  `,
  styles: `
    :host {
      display: block;
    }
    .box {
      display: flex;
      gap: 8px;
      margin: 8px 0;
      padding: 8px 12px;
      border-radius: var(--mat-sys-corner-small);
      background: var(--mat-sys-error-container);
      color: var(--mat-sys-on-error-container);
      font: var(--mat-sys-body-medium);
    }
    mat-icon {
      flex: none;
    }
    .body {
      min-width: 0;
      overflow-wrap: anywhere;
    }
    .message {
      margin: 2px 0;
      font-weight: 600;
    }
    ul {
      margin: 4px 0 0;
      padding-inline-start: 20px;
      max-height: 320px;
      overflow-y: auto;
    }
  `,
})
export class ProblemSummary {
  readonly message = input<string | null>(null);
  readonly items = input<readonly ProblemItem[]>([]);
  /** The list's accessible name, e.g. "Lines to fix". */
  readonly label = input('Problems to fix');
}
