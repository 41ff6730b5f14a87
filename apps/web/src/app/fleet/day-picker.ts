import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';

/** A day picked in the field, with a way to put the field back when the move is called off. */
export interface DayPick {
  date: string;
  revert: () => void;
}

/** Previous day, the service day's date, next day. */
@Component({
  selector: 'ny-day-picker',
  imports: [MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule],
  template: `
    <button mat-icon-button type="button" aria-label="Previous day" (click)="step.emit(-1)">
      <mat-icon>chevron_left</mat-icon>
    </button>
    <mat-form-field appearance="outline" subscriptSizing="dynamic">
      <mat-label>Service day</mat-label>
      <input
        matInput
        type="date"
        #dayInput
        [value]="day()"
        (change)="pick.emit({ date: dayInput.value, revert: revert(dayInput) })"
      />
    </mat-form-field>
    <button mat-icon-button type="button" aria-label="Next day" (click)="step.emit(1)">
      <mat-icon>chevron_right</mat-icon>
    </button>
  `,
  styles: `
    :host {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 4px 8px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DayPicker {
  readonly day = input.required<string>();
  readonly pick = output<DayPick>();
  /** Days to move by: -1 for the previous day, 1 for the next. */
  readonly step = output<number>();

  protected revert(field: HTMLInputElement): () => void {
    return () => (field.value = this.day());
  }
}
