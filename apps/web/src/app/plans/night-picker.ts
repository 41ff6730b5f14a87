import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';

/** The night looked at (previous, date, next) and, for planners, the midday choice and Generate. */
@Component({
  selector: 'ny-night-picker',
  imports: [MatButtonModule, MatCheckboxModule, MatFormFieldModule, MatIconModule, MatInputModule],
  templateUrl: './night-picker.html',
  styleUrl: './night-picker.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-dense' },
})
export class NightPicker {
  readonly night = input<string | null>(null);
  readonly canPlan = input(false);
  readonly includeMidday = input(true);
  readonly busy = input(false);
  /** False for a day inside another service day's night: it has no night of its own to generate. */
  readonly plannable = input(true);

  /** A night picked in the date field (YYYY-MM-DD as typed). */
  readonly pick = output<string>();
  /** Days to move by: -1 for the previous night, 1 for the next. */
  readonly step = output<number>();
  readonly includeMiddayChange = output<boolean>();
  readonly generate = output<void>();
}
