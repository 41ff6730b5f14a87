import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { PlanSummary } from '@nightyard/contracts';
import { firstValueFrom } from 'rxjs';
import { formatServiceDay } from '../depot-state/depot-format';
import { injectSaveFile } from '../core/save-file';
import { injectCanEditFleet } from '../auth/role-checks';
import { ConfirmDialog, type ConfirmData } from '../people/confirm-dialog';
import { SectionIntro } from '../sections/section-intro';
import { ProblemSummary } from '../shared/problem-summary';
import { AdoptDialog, type AdoptData } from './adopt-dialog';
import { NightPicker } from './night-picker';
import { PlanProgress } from './plan-progress';
import { PlanReview } from './plan-review';
import { PlansStore } from './plans-store';
import { PublishConflict } from './publish-conflict';
import { VersionHeader, type OcppVersion } from './version-header';
import { VersionList } from './version-list';
import { VersionNotes } from './version-notes';

/** Plans: the versions of a night's plan, the chosen version's review, generate and publish. */
@Component({
  selector: 'ny-plans-page',
  imports: [
    MatButtonModule,
    MatIconModule,
    MatProgressBarModule,
    NightPicker,
    PlanProgress,
    PlanReview,
    ProblemSummary,
    PublishConflict,
    SectionIntro,
    VersionHeader,
    VersionList,
    VersionNotes,
  ],
  providers: [PlansStore],
  templateUrl: './plans-page.html',
  styleUrl: './plans-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'ny-page' },
})
export class PlansPage {
  protected readonly store = inject(PlansStore);
  private readonly dialog = inject(MatDialog);
  private readonly saveFile = injectSaveFile();

  /** Query parameters: the night (service date) and the chosen version. */
  readonly date = input<string>();
  readonly plan = input<string>();

  protected readonly canPlan = injectCanEditFleet();
  protected readonly nightText = computed(() => {
    const n = this.store.night();
    return n ? formatServiceDay(n) : '';
  });

  constructor() {
    this.store.bind({ date: this.date, plan: this.plan });
  }

  protected step(days: number): void {
    this.store.stepNight(days < 0 ? -1 : 1);
  }

  /** "Saturday, December 5" style name of the service day whose night holds the date looked at. */
  protected readonly withinText = computed(() => {
    const w = this.store.within();
    return w ? formatServiceDay(w) : '';
  });

  protected uploadWhatIf(fileInput: HTMLInputElement): void {
    const file = fileInput.files?.[0];
    fileInput.value = '';
    if (file) void this.store.uploadWhatIf(file);
  }

  protected async downloadScenario(plan: PlanSummary): Promise<void> {
    const blob = await this.store.scenario(plan);
    if (blob) this.saveFile(blob, `scenario-${plan.serviceDate}-v${plan.version}.json`);
  }

  /** Charging profiles for a charging-station management system to enforce the plan. */
  protected async downloadOcpp(plan: PlanSummary, version: OcppVersion): Promise<void> {
    const blob = await this.store.ocppProfiles(plan, version);
    if (blob) this.saveFile(blob, `ocpp-${version}-profiles-${plan.serviceDate}-v${plan.version}.json`);
  }

  protected async publish(plan: PlanSummary): Promise<void> {
    if (this.store.busy()) return;
    const current = this.store.published();
    const depotName = this.store.depot()?.name ?? 'the depot';
    const data: ConfirmData = {
      title: `Publish version ${plan.version}?`,
      message:
        `A published plan cannot be changed: any later change makes a new version. ` +
        (current ? `It replaces version ${current.version}, which becomes superseded. ` : '') +
        `The yard staff and fleet supervisors of ${depotName} are e-mailed the plan for the night of ${formatServiceDay(plan.serviceDate)}.`,
      confirm: 'Publish plan',
    };
    const yes = await firstValueFrom(
      this.dialog
        .open<ConfirmDialog, ConfirmData, boolean>(ConfirmDialog, { data, width: '480px', maxWidth: '95vw' })
        .afterClosed(),
    );
    if (yes) await this.store.publish(plan);
  }

  /**
   * Adopts a what-if: re-checks the study against the depot now, lists what differs in a dialog,
   * then makes a new normal draft and opens it. A refusal (night ended, cannot be re-checked) is
   * shown as the API words it.
   */
  protected async adopt(plan: PlanSummary): Promise<void> {
    const adoption = await this.store.adoption(plan);
    if (!adoption) return;
    const data: AdoptData = {
      adoption,
      night: formatServiceDay(plan.serviceDate),
      depot: this.store.depot()?.name ?? 'the depot',
    };
    const yes = await firstValueFrom(
      this.dialog
        .open<AdoptDialog, AdoptData, boolean>(AdoptDialog, { data, width: '560px', maxWidth: '95vw' })
        .afterClosed(),
    );
    if (yes) await this.store.adopt(plan);
  }
}
