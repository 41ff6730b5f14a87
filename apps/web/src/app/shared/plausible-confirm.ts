import { ChangeDetectionStrategy, Component, input, model } from '@angular/core';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatIconModule } from '@angular/material/icon';

/**
 * A figure that is allowed but unlikely (a charger above the service, a limit above 50 MW): says
 * why beside the field and asks to confirm it before saving. Shows nothing without a warning.
 */
@Component({
  selector: 'ny-plausible-confirm',
  imports: [MatCheckboxModule, MatIconModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    @if (warning(); as w) {
      <div class="warn" role="group" [attr.aria-label]="'Check ' + field()">
        <p class="text" role="status"><mat-icon aria-hidden="true">warning</mat-icon>{{ w }}</p>
        <mat-checkbox [checked]="confirmed()" (change)="confirmed.set($event.checked)">{{
          confirmLabel()
        }}</mat-checkbox>
        @if (missing()) {
          <p class="missing" role="alert">Confirm the figure, or correct it, to save.</p>
        }
      </div>
    }
  `,
  styles: `
    :host {
      display: block;
    }
    .warn {
      margin: 0 0 8px;
      padding: 8px 12px;
      border-radius: var(--mat-sys-corner-small);
      background: var(--mat-sys-tertiary-container);
      color: var(--mat-sys-on-tertiary-container);
      font: var(--mat-sys-body-medium);
    }
    .text {
      display: flex;
      gap: 8px;
      align-items: flex-start;
      margin: 0;
    }
    mat-icon {
      flex: none;
      font-size: 20px;
      width: 20px;
      height: 20px;
    }
    .missing {
      margin: 0;
      font-weight: 600;
    }
  `,
})
export class PlausibleConfirm {
  readonly warning = input<string | null>(null);
  /** The field it is about, for the group's name ("the maximum power"). */
  readonly field = input('the figure');
  readonly confirmLabel = input('Yes, this figure is right');
  readonly confirmed = model(false);
  /** Set when a save was tried without confirming. */
  readonly missing = input(false);
}
