import {
  ChangeDetectionStrategy,
  Component,
  computed,
  inject,
  input,
  linkedSignal,
  resource,
  untracked,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { RatePreview } from '@nightyard/contracts';
import { toApiProblem } from '../core/api-error';
import { Clock } from '../core/clock';
import { ISO_DATE, addDays as shift } from '@nightyard/contracts/depot-time';
import { RateDay } from './rate-day';
import { RatesApi } from './rates-api';

/** Pick a day, see its prices: the chart, its words and the hourly table. */
@Component({
  selector: 'ny-rate-preview-panel',
  imports: [MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule, RateDay],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <div class="pick ny-dense">
      <button mat-icon-button type="button" aria-label="Previous day" (click)="step(-1)">
        <mat-icon>chevron_left</mat-icon>
      </button>
      <mat-form-field appearance="outline" subscriptSizing="dynamic">
        <mat-label>Day to preview</mat-label>
        <input matInput type="date" #dayInput [value]="day()" (input)="day.set(dayInput.value)" />
      </mat-form-field>
      <button mat-icon-button type="button" aria-label="Next day" (click)="step(1)">
        <mat-icon>chevron_right</mat-icon>
      </button>
      <span class="tz">Clock times at the depot ({{ timezone() }})</span>
    </div>
    <div aria-live="polite">
      @if (busy()) {
        <mat-progress-bar mode="indeterminate" aria-label="Loading the preview" />
      }
      @if (problem(); as p) {
        <p class="ny-form-error" role="alert">{{ p }}</p>
      }
    </div>
    @if (preview(); as p) {
      <ny-rate-day [preview]="p" [timezone]="timezone()" />
    }
  `,
  styles: `
    :host {
      display: block;
    }
    .pick {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 4px 8px;
      margin-bottom: 12px;
    }
    .tz {
      color: var(--mat-sys-on-surface-variant);
      font: var(--mat-sys-body-small);
    }
  `,
})
export class RatePreviewPanel {
  private readonly api = inject(RatesApi);
  private readonly clock = inject(Clock);

  readonly planId = input.required<string>();
  readonly timezone = input.required<string>();
  /** The day shown first; today at the depot when absent. */
  readonly initialDate = input<string | null>(null);

  /** The day picked; back to the first day when the plan or the zone changes. */
  protected readonly day = linkedSignal(() => {
    const zone = this.timezone();
    this.planId();
    return this.initialDate() ?? untracked(() => this.clock.todayAt(zone));
  });
  private readonly loaded = resource({
    params: () =>
      ISO_DATE.test(this.day()) ? { planId: this.planId(), date: this.day(), timezone: this.timezone() } : undefined,
    loader: ({ params }) => this.api.preview(params.planId, params.date, params.timezone),
  });
  /** The last preview loaded (kept while the next loads, or when a day is half typed). */
  protected readonly preview = linkedSignal<RatePreview | undefined, RatePreview | null>({
    source: () => (this.loaded.hasValue() ? this.loaded.value() : undefined),
    computation: (p, previous) => p ?? previous?.value ?? null,
  });
  protected readonly busy = this.loaded.isLoading;
  protected readonly problem = computed(() => {
    const err = this.loaded.error();
    return err ? toApiProblem(err).message : null;
  });

  protected step(days: number): void {
    if (ISO_DATE.test(this.day())) this.day.set(shift(this.day(), days));
  }
}
