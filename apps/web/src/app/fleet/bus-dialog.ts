import { ChangeDetectionStrategy, Component, DestroyRef, ElementRef, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { ReactiveFormsModule } from '@angular/forms';
import { MatAutocompleteModule } from '@angular/material/autocomplete';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import type { Bus } from '@nightyard/contracts';
import { applyFieldErrors, toApiProblem } from '../core/api-error';
import { guardDiscard } from '../shared/discard-guard';
import { PlausibleConfirm } from '../shared/plausible-confirm';
import { CONNECTOR_SUGGESTIONS, busForm, busInputOf, consumptionWarning, messageOf } from './bus-form';
import { FleetApi } from './fleet-api';
import { BUS_STATUS_LABELS } from './fleet-format';

export interface BusDialogData {
  depotId: string;
  /** The bus to change; null adds one. */
  bus: Bus | null;
  /** Connector standards already in the fleet, offered first. */
  connectors: readonly string[];
}

/** Add or change a bus. Closes with the saved bus. */
@Component({
  selector: 'ny-bus-dialog',
  imports: [
    MatAutocompleteModule,
    MatButtonModule,
    MatDialogModule,
    MatFormFieldModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    PlausibleConfirm,
    ReactiveFormsModule,
  ],
  templateUrl: './bus-dialog.html',
  styleUrl: './bus-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-dense' },
})
export class BusDialog {
  private readonly api = inject(FleetApi);
  private readonly ref = inject<MatDialogRef<BusDialog, Bus>>(MatDialogRef);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  protected readonly data = inject<BusDialogData>(MAT_DIALOG_DATA);

  protected readonly form = busForm(this.data.bus);
  protected readonly statuses = Object.entries(BUS_STATUS_LABELS) as [Bus['status'], string][];
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly messageOf = messageOf;

  private readonly connectorText = toSignal(this.form.controls.connector.valueChanges, {
    initialValue: this.form.controls.connector.value,
  });
  protected readonly connectorOptions = computed(() => {
    const q = this.connectorText().trim().toLowerCase();
    const all = [...new Set([...this.data.connectors, ...CONNECTOR_SUGGESTIONS])];
    return all.filter((c) => !q || c.toLowerCase().includes(q));
  });

  private readonly kwhPerMile = toSignal(this.form.controls.kwhPerMile.valueChanges, {
    initialValue: this.form.controls.kwhPerMile.value,
  });
  protected readonly consumptionWarning = computed(() => consumptionWarning(this.kwhPerMile()));
  protected readonly consumptionConfirmed = signal(false);
  protected readonly consumptionMissing = signal(false);

  constructor() {
    guardDiscard(this.form, 'the changes to this bus');
    this.form.controls.kwhPerMile.valueChanges.pipe(takeUntilDestroyed()).subscribe(() => {
      this.consumptionConfirmed.set(false);
      this.consumptionMissing.set(false);
    });
    // The reserve is checked against the ceiling: look again when the ceiling changes.
    this.form.controls.ceilingPct.valueChanges
      .pipe(takeUntilDestroyed(inject(DestroyRef)))
      .subscribe(() => this.form.controls.reservePct.updateValueAndValidity({ emitEvent: false }));
  }

  protected async submit(): Promise<void> {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      queueMicrotask(() =>
        this.host.nativeElement.querySelector<HTMLElement>('input.ng-invalid, mat-select.ng-invalid')?.focus(),
      );
      return;
    }
    if (this.consumptionWarning() && !this.consumptionConfirmed()) {
      this.consumptionMissing.set(true);
      queueMicrotask(() => this.host.nativeElement.querySelector<HTMLElement>('ny-plausible-confirm input')?.focus());
      return;
    }
    this.busy.set(true);
    try {
      const body = busInputOf(this.form);
      const bus = this.data.bus
        ? await this.api.updateBus(this.data.depotId, this.data.bus.id, body)
        : await this.api.addBus(this.data.depotId, body);
      this.ref.close(bus);
    } catch (err) {
      const p = toApiProblem(err);
      const rest = applyFieldErrors(this.form, p.fields);
      this.problem.set(rest.length ? `${p.message} ${rest.join(' ')}` : p.message);
    } finally {
      this.busy.set(false);
    }
  }
}
