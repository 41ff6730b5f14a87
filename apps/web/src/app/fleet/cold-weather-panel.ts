import { ChangeDetectionStrategy, Component, computed, effect, inject, input, output, signal } from '@angular/core';
import { FormArray, FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import type { ColdWeatherTable } from '@nightyard/contracts';
import { applyFieldErrors, toApiProblem } from '../core/api-error';
import { messageOf, numberIn } from './bus-form';
import { FleetApi } from './fleet-api';
import { fmt2 } from './fleet-format';
import { ProblemSummary } from '../shared/problem-summary';
import { trackUnsaved } from '../core/unsaved-edits';

function bandRow(band: { belowF: number | null; factor: number | null } = { belowF: null, factor: null }) {
  return new FormGroup({
    belowF: new FormControl<number | null>(band.belowF, {
      validators: [numberIn('The temperature', -80, 120, { required: 'Enter a temperature in °F' })],
    }),
    factor: new FormControl<number | null>(band.factor, {
      validators: [numberIn('A factor', 1, 3, { required: 'Enter a factor from 1 to 3' })],
    }),
  });
}

/** The table of cold-weather factors on energy per mile: read by all, changed by fleet editors. */
@Component({
  selector: 'ny-cold-weather-panel',
  imports: [MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, ProblemSummary, ReactiveFormsModule],
  templateUrl: './cold-weather-panel.html',
  styleUrl: './cold-weather-panel.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ColdWeatherPanel {
  private readonly api = inject(FleetApi);

  readonly depotId = input.required<string>();
  readonly bands = input.required<ColdWeatherTable>();
  readonly canEdit = input(false);
  readonly saved = output<ColdWeatherTable>();

  protected readonly editing = signal(false);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly form = new FormGroup({ bands: new FormArray<ReturnType<typeof bandRow>>([]) });
  protected readonly messageOf = messageOf;
  protected readonly fmt2 = fmt2;
  /** Warmest band first: the order in which they read ("below 50 °F, below 32 °F ..."). */
  protected readonly sorted = computed(() => [...this.bands()].sort((a, b) => b.belowF - a.belowF));

  constructor() {
    trackUnsaved(
      () => this.canEdit() && this.editing() && this.form.dirty,
      () => 'the cold-weather factors',
    );
    effect(() => {
      const bands = this.sorted();
      if (!this.editing()) this.reset(bands);
    });
  }

  private reset(bands: ColdWeatherTable): void {
    this.form.controls.bands.clear();
    for (const b of bands) this.form.controls.bands.push(bandRow(b));
  }

  protected edit(): void {
    this.reset(this.sorted());
    this.problem.set(null);
    this.editing.set(true);
  }

  protected cancel(): void {
    this.editing.set(false);
    this.problem.set(null);
    this.reset(this.sorted());
  }

  protected add(): void {
    this.form.controls.bands.push(bandRow());
  }

  protected remove(i: number): void {
    this.form.controls.bands.removeAt(i);
  }

  protected async save(): Promise<void> {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const bands = this.form.controls.bands
      .getRawValue()
      .map((b) => ({ belowF: Number(b.belowF), factor: Number(b.factor) }));
    if (new Set(bands.map((b) => b.belowF)).size !== bands.length) {
      this.problem.set('Give each temperature once.');
      return;
    }
    this.busy.set(true);
    try {
      const saved = await this.api.saveColdWeather(this.depotId(), bands);
      this.editing.set(false);
      this.saved.emit(saved);
    } catch (err) {
      const p = toApiProblem(err);
      const rest = applyFieldErrors(this.form, p.fields);
      this.problem.set(rest.length ? `${p.message} ${rest.join(' ')}` : p.message);
    } finally {
      this.busy.set(false);
    }
  }
}
