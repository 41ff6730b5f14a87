import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { cabinetInputSchema, type Cabinet } from '@nightyard/contracts';
import { toApiProblem } from '../core/api-error';
import { applyServerErrors, errorText, zodValidator } from '../shared/form-paths';
import { guardDiscard } from '../shared/discard-guard';
import { ProblemSummary, type ProblemItem } from '../shared/problem-summary';
import { DepotApi } from './depot-api';

export interface CabinetDialogData {
  depotId: string;
  /** The cabinet to change; absent to add one. */
  cabinet?: Cabinet;
}

const shape = cabinetInputSchema.shape;

/** Add or change a power cabinet: its label and the kW its chargers share. */
@Component({
  selector: 'ny-cabinet-dialog',
  imports: [
    MatButtonModule,
    MatDialogModule,
    MatFormFieldModule,
    MatInputModule,
    MatProgressBarModule,
    ProblemSummary,
    ReactiveFormsModule,
  ],
  template: `
    <h2 mat-dialog-title>{{ data.cabinet ? 'Edit power cabinet ' + data.cabinet.label : 'Add a power cabinet' }}</h2>
    <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
      <mat-dialog-content>
        <p class="intro">The chargers on one cabinet share its limit: together they never draw more.</p>
        <div class="pair">
          <mat-form-field appearance="outline">
            <mat-label>Cabinet label</mat-label>
            <input matInput formControlName="label" autocomplete="off" cdkFocusInitial />
            <mat-error>{{ error(form.controls.label) }}</mat-error>
          </mat-form-field>
          <mat-form-field appearance="outline">
            <mat-label>Shared limit</mat-label>
            <input matInput type="number" min="0" step="any" formControlName="limitKw" />
            <span matTextSuffix>kW</span>
            <mat-error>{{ error(form.controls.limitKw) }}</mat-error>
          </mat-form-field>
        </div>
        <ny-problem-summary [message]="problem()" [items]="problemItems()" />
        @if (busy()) {
          <mat-progress-bar mode="indeterminate" aria-label="Saving the power cabinet" />
        }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="busy()">Save cabinet</button>
      </mat-dialog-actions>
    </form>
  `,
  styleUrl: './depot-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-dense' },
})
export class CabinetDialog {
  private readonly api = inject(DepotApi);
  private readonly ref = inject<MatDialogRef<CabinetDialog, Cabinet>>(MatDialogRef);
  protected readonly data = inject<CabinetDialogData>(MAT_DIALOG_DATA);

  protected readonly error = errorText;
  protected readonly form = new FormGroup({
    label: new FormControl(this.data.cabinet?.label ?? '', {
      nonNullable: true,
      validators: zodValidator(shape.label, 'Label the cabinet'),
    }),
    limitKw: new FormControl<number | null>(
      this.data.cabinet?.limitKw ?? null,
      zodValidator(shape.limitKw, 'Enter the cabinet limit in kW'),
    ),
  });
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly problemItems = signal<ProblemItem[]>([]);

  constructor() {
    guardDiscard(this.form, 'the changes to this power cabinet');
  }

  protected async submit(): Promise<void> {
    this.problem.set(null);
    this.problemItems.set([]);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const v = this.form.getRawValue();
    const body = { label: v.label.trim(), limitKw: v.limitKw ?? 0 };
    this.busy.set(true);
    try {
      const saved = this.data.cabinet
        ? await this.api.updateCabinet(this.data.depotId, this.data.cabinet.id, body)
        : await this.api.addCabinet(this.data.depotId, body);
      this.ref.close(saved);
    } catch (err) {
      const p = toApiProblem(err);
      this.problem.set(p.message);
      this.problemItems.set(applyServerErrors(this.form, p.fields).map((r) => ({ where: r.path, message: r.message })));
    } finally {
      this.busy.set(false);
    }
  }
}
