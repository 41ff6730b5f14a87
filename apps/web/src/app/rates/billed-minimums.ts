import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { errorText } from '../shared/form-paths';
import type { RatePlanForm } from './rate-plan-form';

/** What is billed at least: a demand ratchet on past months' peaks, and a minimum bill. */
@Component({
  selector: 'ny-billed-minimums',
  imports: [MatFormFieldModule, MatInputModule, MatSelectModule, ReactiveFormsModule],
  templateUrl: './billed-minimums.html',
  styleUrls: ['../shared/panel.scss', './rate-rows.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BilledMinimums {
  readonly form = input.required<RatePlanForm>();
  protected readonly error = errorText;
}
