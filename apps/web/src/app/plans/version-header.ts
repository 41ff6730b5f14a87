import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import type { PlanSummary } from '@nightyard/contracts';
import { KIND_LABELS, versionLabel, when } from './plan-format';

export type OcppVersion = '1.6' | '2.0.1';

/** The chosen version's heading, who made and published it, and what a planner can do with it. */
@Component({
  selector: 'ny-version-header',
  imports: [MatButtonModule, MatIconModule],
  templateUrl: './version-header.html',
  styleUrls: ['./plan-state.scss', './version-header.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'review-header' },
})
export class VersionHeader {
  readonly plan = input.required<PlanSummary>();
  readonly canPlan = input(false);
  readonly busy = input(false);
  /** The depot's zone, for the times. */
  readonly tz = input.required<string>();

  readonly downloadScenario = output<void>();
  readonly downloadOcpp = output<OcppVersion>();
  readonly publish = output<void>();
  readonly adopt = output<void>();

  protected readonly kindLabels = KIND_LABELS;
  protected readonly versionLabel = versionLabel;
  protected readonly when = when;
}
