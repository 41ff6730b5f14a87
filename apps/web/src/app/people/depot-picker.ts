import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { toObservable } from '@angular/core/rxjs-interop';
import type { FormControl } from '@angular/forms';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatRadioModule } from '@angular/material/radio';
import type { DepotSummary } from '@nightyard/contracts';
import { startWith, switchMap } from 'rxjs';

let nextId = 0;

/**
 * The depots a person works at: a choice of one for yard staff (they work at one depot), boxes to
 * tick for everyone else; administrators see every depot whatever is ticked.
 */
@Component({
  selector: 'ny-depot-picker',
  imports: [MatCheckboxModule, MatRadioModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <fieldset [attr.aria-describedby]="hintId + (problem() ? ' ' + errorId : '')">
      <legend>Depots</legend>
      <p class="hint" [id]="hintId">{{ hint() }}</p>
      @if (single()) {
        <mat-radio-group
          class="boxes"
          aria-label="Depot"
          [value]="chosen().at(0) ?? null"
          (change)="set([$event.value])"
        >
          @for (d of depots(); track d.id) {
            <mat-radio-button [value]="d.id">{{ d.name }}</mat-radio-button>
          }
        </mat-radio-group>
      } @else {
        <div class="boxes">
          @for (d of depots(); track d.id) {
            <mat-checkbox [checked]="chosen().includes(d.id)" (change)="toggle(d.id, $event.checked)">{{
              d.name
            }}</mat-checkbox>
          }
        </div>
      }
      <p class="ny-form-error" [id]="errorId" aria-live="polite">{{ problem() }}</p>
    </fieldset>
  `,
  styleUrl: './choice-group.scss',
  styles: `
    legend {
      margin-bottom: 2px;
    }
    .hint {
      margin: 0 0 4px;
      color: var(--mat-sys-on-surface-variant);
      font: var(--mat-sys-body-small);
    }
  `,
})
export class DepotPicker {
  readonly control = input.required<FormControl<string[]>>();
  readonly depots = input.required<readonly DepotSummary[]>();
  /** Yard staff only: exactly one depot. */
  readonly single = input(false);
  readonly admin = input(false);
  /** The message to show (after a submit attempt, or from the server). */
  readonly problem = input<string | null>(null);

  protected readonly hintId = `ny-depots-hint-${nextId}`;
  protected readonly errorId = `ny-depots-error-${nextId++}`;

  protected readonly chosen = toSignal(
    toObservable(this.control).pipe(switchMap((c) => c.valueChanges.pipe(startWith(c.value)))),
    { initialValue: [] as string[] },
  );
  protected readonly hint = computed(() =>
    this.admin()
      ? 'Administrators see every depot; the ones ticked are where they work.'
      : this.single()
        ? 'Yard staff work at one depot and see only it.'
        : 'They see only the depots ticked.',
  );

  protected set(ids: string[]): void {
    this.control().setValue(ids);
    this.control().markAsDirty();
  }

  protected toggle(id: string, on: boolean): void {
    const now = this.control().value.filter((d) => d !== id);
    // Kept in the order of the list, so what is sent reads as shown.
    const next = on
      ? this.depots()
          .map((d) => d.id)
          .filter((d) => d === id || now.includes(d))
      : now;
    this.set(next);
  }
}
