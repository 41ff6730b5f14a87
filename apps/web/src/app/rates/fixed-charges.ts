import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { errorText } from '../shared/form-paths';
import { fixedChargeGroup, type RatePlanForm } from './rate-plan-form';

/** A rate plan's fixed charges: a name, an amount, per day or per month. */
@Component({
  selector: 'ny-fixed-charges',
  imports: [MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatSelectModule, ReactiveFormsModule],
  template: `
    @let charges = form().controls.fixedCharges;
    <section class="panel" aria-labelledby="plan-fixed-heading">
      <div class="panel-header">
        <h2 id="plan-fixed-heading">Fixed charges</h2>
        <button mat-stroked-button type="button" (click)="charges.push(newCharge())">
          <mat-icon>add</mat-icon>Add fixed charge
        </button>
      </div>
      @for (c of charges.controls; track c; let ci = $index) {
        <div class="fixed-row" [formGroup]="c" role="group" [attr.aria-label]="'Fixed charge ' + (ci + 1)">
          <mat-form-field appearance="outline">
            <mat-label>Charge name</mat-label>
            <input matInput formControlName="name" autocomplete="off" />
            <mat-error>{{ error(c.controls.name) }}</mat-error>
          </mat-form-field>
          <mat-form-field appearance="outline">
            <mat-label>Amount</mat-label>
            <input matInput type="number" min="0" step="any" formControlName="amount" />
            <mat-error>{{ error(c.controls.amount) }}</mat-error>
          </mat-form-field>
          <mat-form-field appearance="outline">
            <mat-label>Per</mat-label>
            <mat-select formControlName="per">
              <mat-option value="day">day</mat-option>
              <mat-option value="month">month</mat-option>
            </mat-select>
          </mat-form-field>
          <button
            mat-icon-button
            type="button"
            class="remove"
            [attr.aria-label]="'Remove fixed charge ' + (ci + 1)"
            (click)="charges.removeAt(ci)"
          >
            <mat-icon>delete</mat-icon>
          </button>
        </div>
      } @empty {
        <p class="empty">No fixed charges.</p>
      }
    </section>
  `,
  styleUrls: ['../shared/panel.scss', './rate-rows.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FixedCharges {
  readonly form = input.required<RatePlanForm>();
  protected readonly error = errorText;
  protected readonly newCharge = fixedChargeGroup;
}
