import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { errorText } from '../shared/form-paths';
import { EnergyBlocks } from './energy-blocks';
import { PeriodFields } from './period-fields';
import { MONTH_NAMES } from './rate-format';
import { periodGroup, type SeasonGroup } from './rate-plan-form';

/** One season of a rate plan: its months and base prices, its time-of-use periods and energy blocks. */
@Component({
  selector: 'ny-season-fields',
  imports: [
    EnergyBlocks,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    PeriodFields,
    ReactiveFormsModule,
  ],
  templateUrl: './season-fields.html',
  styleUrls: ['../shared/panel.scss', './rate-rows.scss', './season-fields.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SeasonFields {
  readonly season = input.required<SeasonGroup>();
  /** Position from 0, shown from 1. */
  readonly index = input.required<number>();
  readonly remove = output<void>();

  protected readonly months = MONTH_NAMES.map((name, i) => ({ value: i + 1, name }));
  protected readonly error = errorText;

  protected addPeriod(): void {
    this.season().controls.periods.push(periodGroup());
  }
}
