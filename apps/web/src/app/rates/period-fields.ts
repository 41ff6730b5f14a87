import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatAutocompleteModule } from '@angular/material/autocomplete';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { DAY_TYPES } from '@nightyard/contracts';
import { ClockTimeInput } from '../shared/clock-time-input';
import { errorText } from '../shared/form-paths';
import { DAY_TYPE_LABELS, windowEndNote } from './rate-format';
import { windowGroup, type PeriodGroup, type WindowGroup } from './rate-plan-form';

/** One time-of-use period of a season: its name, prices and windows (days, from, to). */
@Component({
  selector: 'ny-period-fields',
  imports: [
    ClockTimeInput,
    MatAutocompleteModule,
    MatButtonModule,
    MatCheckboxModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    ReactiveFormsModule,
  ],
  templateUrl: './period-fields.html',
  styleUrls: ['../shared/panel.scss', './rate-rows.scss', './period-fields.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PeriodFields {
  readonly period = input.required<PeriodGroup>();
  /** Positions from 0, shown from 1. */
  readonly season = input.required<number>();
  readonly index = input.required<number>();
  readonly remove = output<void>();

  protected readonly periodNames = ['on-peak', 'mid-peak', 'super off-peak', 'critical peak'];
  protected readonly dayTypes = DAY_TYPES;
  protected readonly dayLabels = DAY_TYPE_LABELS;
  protected readonly error = errorText;

  protected addWindow(): void {
    this.period().controls.windows.push(windowGroup());
  }

  protected windowNote(w: WindowGroup): string | null {
    return windowEndNote(w.controls.from.value, w.controls.to.value);
  }
}
