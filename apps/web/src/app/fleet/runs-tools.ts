import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { type FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';

/** The ways to fill a day at once: upload a runs CSV (or get its template), copy another day. */
@Component({
  selector: 'ny-runs-tools',
  imports: [MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, ReactiveFormsModule],
  templateUrl: './runs-tools.html',
  styleUrl: './runs-tools.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RunsTools {
  /** The day to copy from. */
  readonly copyFrom = input.required<FormControl<string>>();
  /** Something is under way (or loading): the buttons wait. */
  readonly disabled = input(false);

  readonly upload = output<HTMLInputElement>();
  readonly downloadTemplate = output<void>();
  readonly copyRuns = output<void>();
}
