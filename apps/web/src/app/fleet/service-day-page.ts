import { ChangeDetectionStrategy, Component, inject, input } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { ActivatedRoute, Router } from '@angular/router';
import type { ColdWeatherTable } from '@nightyard/contracts';
import { firstValueFrom } from 'rxjs';
import { addDays, isIsoDate } from '@nightyard/contracts/depot-time';
import { formatServiceDay } from '../depot-state/depot-format';
import { ConfirmDialog, type ConfirmData } from '../people/confirm-dialog';
import { SectionIntro } from '../sections/section-intro';
import { ProblemSummary } from '../shared/problem-summary';
import { messageOf } from './bus-form';
import { ColdWeatherPanel } from './cold-weather-panel';
import { DayPicker, type DayPick } from './day-picker';
import { injectSaveFile } from '../core/save-file';
import { injectCanEditFleet } from '../auth/role-checks';
import { FleetTabs } from './fleet-tabs';
import { RunsEditor } from './runs-editor';
import { RunsTable } from './runs-table';
import { RunsTools } from './runs-tools';
import { ServiceDayStore } from './service-day-store';
import { trackUnsaved } from '../core/unsaved-edits';

export { previousWeekday } from './service-day-store';

/** Fleet > Service day: a day's runs and arrival states of charge, typed, copied or uploaded. */
@Component({
  selector: 'ny-service-day-page',
  imports: [
    ColdWeatherPanel,
    DayPicker,
    FleetTabs,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    ProblemSummary,
    ReactiveFormsModule,
    RunsEditor,
    RunsTable,
    RunsTools,
    SectionIntro,
  ],
  providers: [ServiceDayStore],
  templateUrl: './service-day-page.html',
  styleUrl: './service-day-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
})
export class ServiceDayPage {
  protected readonly store = inject(ServiceDayStore);
  private readonly router = inject(Router);
  private readonly route = inject(ActivatedRoute);
  private readonly dialog = inject(MatDialog);
  private readonly saveFile = injectSaveFile();

  /** The `date` query parameter (YYYY-MM-DD); without it, tonight's service day as the server says. */
  readonly date = input<string>();

  protected readonly canEdit = injectCanEditFleet();
  protected readonly form = this.store.form;
  protected readonly messageOf = messageOf;

  constructor() {
    trackUnsaved(
      () => this.canEdit() && this.form.dirty,
      () => `the runs of ${this.store.dayText()}`,
    );
    this.store.bind(this.date);
  }

  /** Asked by the route before leaving the page: unsaved changes to the runs are confirmed first. */
  canLeave(): boolean | Promise<boolean> {
    if (!this.canEdit() || !this.form.dirty) return true;
    return this.confirm({
      title: 'Leave without saving?',
      message: `The changes to the runs of ${this.store.dayText()} are not saved. They are lost if you leave this page.`,
      confirm: 'Discard changes',
    });
  }

  protected goTo(date: string, revert?: DayPick['revert']): void {
    if (!isIsoDate(date) || date === this.store.day()) return;
    const go = () =>
      void this.router.navigate([], { relativeTo: this.route, queryParams: { date }, queryParamsHandling: 'merge' });
    if (!this.canEdit() || !this.form.dirty) {
      go();
      return;
    }
    this.confirm({
      title: 'Leave without saving?',
      message: `The changes to the runs of ${this.store.dayText()} are not saved. They are lost if you open another day.`,
      confirm: 'Discard changes',
    }).then((yes) => {
      if (yes) go();
      else revert?.();
    });
  }

  protected step(days: number): void {
    this.goTo(addDays(this.store.day(), days));
  }

  protected upload(fileInput: Pick<HTMLInputElement, 'files' | 'value'>): Promise<void> {
    const file = fileInput.files?.[0];
    fileInput.value = '';
    return file ? this.store.upload(file) : Promise.resolve();
  }

  protected async downloadTemplate(): Promise<void> {
    const blob = await this.store.template();
    if (blob) this.saveFile(blob, `runs-${this.store.day()}.csv`);
  }

  protected copy(): Promise<void> {
    return this.store.copy(({ from, message }) =>
      this.confirm({
        title: `Replace the runs of ${this.store.dayText()}?`,
        message: `${message}. The runs of ${formatServiceDay(from)} take their place at the same times; states of charge on arrival are not copied.`,
        confirm: 'Replace runs',
      }),
    );
  }

  protected onBandsSaved(bands: ColdWeatherTable): void {
    this.store.bandsSaved(bands);
  }

  private confirm(data: ConfirmData): Promise<boolean> {
    return firstValueFrom(
      this.dialog
        .open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, { data, width: '460px', maxWidth: '95vw' })
        .afterClosed(),
    ).then((r) => r === true);
  }
}
