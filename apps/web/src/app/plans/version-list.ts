import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { PlanSummary } from '@nightyard/contracts';
import { KIND_LABELS, money, versionLabel, when } from './plan-format';

/** The night's versions, newest first, each a link that opens it; the chosen one marked. */
@Component({
  selector: 'ny-version-list',
  imports: [MatProgressBarModule, RouterLink],
  templateUrl: './version-list.html',
  styleUrls: ['./plan-state.scss', './version-list.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class VersionList {
  readonly versions = input.required<readonly PlanSummary[]>();
  readonly selectedId = input<string | null>(null);
  readonly loading = input(false);
  readonly canPlan = input(false);
  /** The depot's zone, for the times. */
  readonly tz = input.required<string>();
  readonly currency = input.required<string>();

  protected readonly kindLabels = KIND_LABELS;
  protected readonly versionLabel = versionLabel;
  protected readonly when = when;
  protected readonly money = money;
}
