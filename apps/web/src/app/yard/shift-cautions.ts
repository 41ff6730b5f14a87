import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { ADVISORY, HIGH_VOLTAGE_WARNING, SAFETY_CAUTIONS } from './safety';

/**
 * The brief's high-voltage cautions. At the start of a shift they fill the page and must be
 * acknowledged; afterwards they stay one tap away.
 */
@Component({
  selector: 'ny-shift-cautions',
  imports: [MatButtonModule, MatIconModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    @if (acknowledged()) {
      <details class="reminder">
        <summary>
          <mat-icon aria-hidden="true">electric_bolt</mat-icon>
          High-voltage cautions (acknowledged for this shift)
        </summary>
        <p class="warning">{{ warning }}</p>
        <ul>
          @for (c of cautions; track c) {
            <li>{{ c }}</li>
          }
        </ul>
        <p class="advisory">{{ advisory }}</p>
      </details>
    } @else {
      <section class="gate" aria-labelledby="ny-cautions-title">
        <h2 id="ny-cautions-title">
          <mat-icon aria-hidden="true">electric_bolt</mat-icon>
          Before you start: high voltage
        </h2>
        <p class="warning">{{ warning }}</p>
        <ul>
          @for (c of cautions; track c) {
            <li>{{ c }}</li>
          }
        </ul>
        <p class="advisory">{{ advisory }}</p>
        <button mat-flat-button type="button" [disabled]="busy()" (click)="acknowledge.emit()">
          <mat-icon>verified_user</mat-icon>
          I have read the cautions: start my shift
        </button>
      </section>
    }
  `,
  styles: `
    @use './yard-touch' as touch;
    :host {
      display: block;
      @include touch.big-buttons;
    }
    .gate {
      display: flex;
      flex-direction: column;
      gap: 12px;
      padding: 20px 16px;
      border: 3px solid var(--mat-sys-tertiary);
      border-radius: var(--mat-sys-corner-large);
      background: var(--mat-sys-tertiary-container);
      color: var(--mat-sys-on-tertiary-container);
    }
    h2 {
      display: flex;
      align-items: center;
      gap: 8px;
      font: var(--mat-sys-headline-small);
      font-weight: 700;
    }
    p,
    ul {
      margin: 0;
    }
    ul {
      display: flex;
      flex-direction: column;
      gap: 8px;
      padding-inline-start: 22px;
      font: var(--mat-sys-body-large);
    }
    .warning,
    .advisory {
      font: var(--mat-sys-title-medium);
      font-weight: 700;
    }
    .reminder {
      padding: 0 12px;
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: var(--mat-sys-corner-medium);
      background: var(--mat-sys-surface-container-low);
    }
    .reminder[open] {
      padding-bottom: 12px;
    }
    .reminder ul {
      margin: 8px 0;
    }
    summary {
      display: flex;
      align-items: center;
      gap: 8px;
      min-height: 48px;
      cursor: pointer;
      font: var(--mat-sys-title-small);
    }
  `,
})
export class ShiftCautions {
  readonly acknowledged = input.required<boolean>();
  readonly busy = input(false);
  readonly acknowledge = output<void>();

  protected readonly warning = HIGH_VOLTAGE_WARNING;
  protected readonly cautions = SAFETY_CAUTIONS;
  protected readonly advisory = ADVISORY;
}
