import { ChangeDetectionStrategy, Component, ElementRef, computed, inject, input } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { errorText } from '../shared/form-paths';
import { ProblemSummary } from '../shared/problem-summary';
import { injectCanEditSetup } from '../auth/role-checks';
import { BilledMinimums } from './billed-minimums';
import { FixedCharges } from './fixed-charges';
import { HolidayList } from './holiday-list';
import { ImportNotes } from './import-notes';
import { RatePlanEditorStore } from './rate-plan-editor-store';
import { seasonGroup, type RatePlanForm } from './rate-plan-form';
import { RatePlanSummary } from './rate-plan-summary';
import { SeasonFields } from './season-fields';
import { trackUnsaved } from '../core/unsaved-edits';

/** Write a rate plan, or review one mapped from a URDB file, then save it (all or nothing). */
@Component({
  selector: 'ny-rate-plan-editor-page',
  imports: [
    BilledMinimums,
    FixedCharges,
    HolidayList,
    ImportNotes,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    ProblemSummary,
    RatePlanSummary,
    ReactiveFormsModule,
    RouterLink,
    SeasonFields,
  ],
  providers: [RatePlanEditorStore],
  templateUrl: './rate-plan-editor-page.html',
  styleUrls: ['../shared/panel.scss', './rate-plan-editor-page.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
})
export class RatePlanEditorPage {
  protected readonly store = inject(RatePlanEditorStore);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);

  /** Route parameter: the plan to edit (absent for a new one). */
  readonly id = input<string>();
  /** Query parameter: `urdb` when the form starts from an imported file. */
  readonly from = input<string>();

  protected readonly canEdit = injectCanEditSetup();
  protected readonly error = errorText;

  protected readonly heading = computed(() => {
    const plan = this.store.plan();
    if (!this.canEdit()) return plan?.name ?? 'Rate plan';
    switch (this.store.mode()) {
      case 'import':
        return 'Check the imported rate plan';
      case 'edit':
        return `Edit ${plan?.name ?? 'rate plan'}`;
      default:
        return 'New rate plan';
    }
  });

  constructor() {
    this.store.bind({ id: this.id, from: this.from });
    trackUnsaved(
      () => this.canEdit() && !!this.store.form()?.dirty,
      () => this.store.plan()?.name ?? 'the new rate plan',
    );
  }

  protected addSeason(f: RatePlanForm): void {
    f.controls.seasons.push(seasonGroup());
  }

  /** Saves; with errors, the first field in error is focused. */
  protected async save(f: RatePlanForm): Promise<void> {
    if (!(await this.store.save(f))) this.focusFirstError();
  }

  private focusFirstError(): void {
    queueMicrotask(() =>
      this.host.nativeElement
        .querySelector<HTMLElement>(
          'input.ng-invalid, mat-select.ng-invalid, .days.ng-invalid input, .window.ng-invalid input',
        )
        ?.focus(),
    );
  }
}
