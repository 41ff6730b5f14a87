import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { errorText } from '../shared/form-paths';
import { holidayControl, type RatePlanForm } from './rate-plan-form';

/** The dates a rate plan prices with its holiday windows. */
@Component({
  selector: 'ny-holiday-list',
  imports: [MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, ReactiveFormsModule],
  template: `
    @let holidays = form().controls.holidays;
    <section class="panel" aria-labelledby="plan-holidays-heading">
      <div class="panel-header">
        <h2 id="plan-holidays-heading">Holidays</h2>
        <button mat-stroked-button type="button" (click)="holidays.push(newHoliday())">
          <mat-icon>add</mat-icon>Add holiday
        </button>
      </div>
      <p class="hint">Dates priced with the holiday windows instead of the weekday ones.</p>
      <div class="holidays">
        @for (h of holidays.controls; track h; let hi = $index) {
          <div class="holiday-row">
            <mat-form-field appearance="outline">
              <mat-label>Holiday {{ hi + 1 }}</mat-label>
              <input matInput type="date" [formControl]="h" />
              <mat-error>{{ error(h) }}</mat-error>
            </mat-form-field>
            <button
              mat-icon-button
              type="button"
              class="remove"
              [attr.aria-label]="'Remove holiday ' + (hi + 1)"
              (click)="holidays.removeAt(hi)"
            >
              <mat-icon>delete</mat-icon>
            </button>
          </div>
        } @empty {
          <p class="empty">No holidays listed.</p>
        }
      </div>
    </section>
  `,
  styleUrls: ['../shared/panel.scss', './rate-rows.scss'],
  styles: `
    .holidays {
      display: flex;
      flex-wrap: wrap;
      gap: 0 16px;
    }

    .holiday-row {
      display: flex;
      align-items: flex-start;
      gap: 4px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class HolidayList {
  readonly form = input.required<RatePlanForm>();
  protected readonly error = errorText;
  protected readonly newHoliday = () => holidayControl();
}
