import { ChangeDetectionStrategy, Component, effect, inject, input, signal, untracked } from '@angular/core';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
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
  imports: [MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule, RateDay, ReactiveFormsModule],
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <div class="pick ny-dense">
      <button mat-icon-button type="button" aria-label="Previous day" (click)="step(-1)"><mat-icon>chevron_left</mat-icon></button>
      <mat-form-field appearance="outline" subscriptSizing="dynamic">
        <mat-label>Day to preview</mat-label>
        <input matInput type="date" [formControl]="date" />
      </mat-form-field>
      <button mat-icon-button type="button" aria-label="Next day" (click)="step(1)"><mat-icon>chevron_right</mat-icon></button>
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
    :host { display: block; }
    .pick { display: flex; flex-wrap: wrap; align-items: center; gap: 4px 8px; margin-bottom: 12px; }
    .tz { color: var(--mat-sys-on-surface-variant); font: var(--mat-sys-body-small); }
  `,
})
export class RatePreviewPanel {
  private readonly api = inject(RatesApi);
  private readonly clock = inject(Clock);

  readonly planId = input.required<string>();
  readonly timezone = input.required<string>();
  /** The day shown first; today at the depot when absent. */
  readonly initialDate = input<string | null>(null);

  protected readonly date = new FormControl('', { nonNullable: true });
  protected readonly preview = signal<RatePreview | null>(null);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  private requestNo = 0;

  constructor() {
    effect(() => {
      const zone = this.timezone();
      const first = this.initialDate() ?? untracked(() => this.clock.todayAt(zone));
      this.planId();
      untracked(() => {
        this.date.setValue(first, { emitEvent: false });
        void this.load(first);
      });
    });
    this.date.valueChanges.subscribe((d) => void this.load(d));
  }

  protected step(days: number): void {
    if (ISO_DATE.test(this.date.value)) this.date.setValue(shift(this.date.value, days));
  }

  private async load(date: string): Promise<void> {
    if (!ISO_DATE.test(date)) return;
    const no = ++this.requestNo;
    this.busy.set(true);
    this.problem.set(null);
    try {
      const preview = await this.api.preview(this.planId(), date, this.timezone());
      if (no === this.requestNo) this.preview.set(preview);
    } catch (err) {
      if (no === this.requestNo) this.problem.set(toApiProblem(err).message);
    } finally {
      if (no === this.requestNo) this.busy.set(false);
    }
  }
}
