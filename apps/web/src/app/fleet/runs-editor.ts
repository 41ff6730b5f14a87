import { ChangeDetectionStrategy, Component, ElementRef, inject, input, output } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { ClockTimeInput } from '../shared/clock-time-input';
import { messageOf } from './bus-form';
import { fmt1 } from './fleet-format';
import { pullInNextDay, socSourceText, type RunRow, type ServiceDayForm } from './run-rows';

/** A day's runs as a form: one row a run (a card on a phone), add, remove, discard and save. */
@Component({
  selector: 'ny-runs-editor',
  imports: [
    ClockTimeInput,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    ReactiveFormsModule,
  ],
  templateUrl: './runs-editor.html',
  styleUrls: ['./runs-grid.scss', './runs-editor.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RunsEditor {
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);

  readonly form = input.required<ServiceDayForm>();
  /** The depot's bus numbers, in order. */
  readonly busNumbers = input.required<readonly string[]>();
  readonly busy = input(false);

  readonly save = output<void>();
  readonly addRun = output<void>();
  readonly removeRun = output<number>();
  readonly discard = output<void>();

  protected readonly messageOf = messageOf;
  protected readonly fmt1 = fmt1;
  protected readonly pullInNextDay = pullInNextDay;
  protected readonly socSourceText = socSourceText;

  protected rows(): RunRow[] {
    return this.form().controls.runs.controls;
  }

  /** A new row, its bus field focused. */
  protected add(): void {
    this.addRun.emit();
    queueMicrotask(() => {
      const selects = this.host.nativeElement.querySelectorAll<HTMLElement>('tbody tr:last-child mat-select');
      selects[selects.length - 1]?.focus();
    });
  }

  /** Saves; with errors in the table, the first one is focused (nothing is sent). */
  protected submit(): void {
    this.save.emit();
    if (this.form().invalid) {
      queueMicrotask(() =>
        this.host.nativeElement
          .querySelector<HTMLElement>('form input.ng-invalid, form mat-select.ng-invalid')
          ?.focus(),
      );
    }
  }
}
