import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import type { PlanDetail, PlanResult, PlanSummary } from '@nightyard/contracts';
import { BusPlanTable } from './bus-plan-table';
import { ChargerTimeline, type TimelineCharger } from './charger-timeline';
import { CrewMovesNote } from './crew-moves-note';
import { PlanCompare } from './plan-compare';
import { busRows, money, num, pct, planFigures } from './plan-format';
import { SiteLoadChart } from './site-load-chart';

/** A finished plan: the figures, the charger timeline, the buses, the site load, the comparison. */
@Component({
  selector: 'ny-plan-review',
  imports: [BusPlanTable, ChargerTimeline, CrewMovesNote, MatIconModule, PlanCompare, SiteLoadChart],
  templateUrl: './plan-review.html',
  styleUrl: './plan-review.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PlanReview {
  readonly plan = input.required<PlanDetail & { result: PlanResult }>();
  readonly versions = input.required<readonly PlanSummary[]>();
  readonly chargers = input<readonly TimelineCharger[]>([]);
  readonly comparePreferred = input<string | null>(null);

  protected readonly money = money;
  protected readonly num = num;
  protected readonly pct = pct;

  protected readonly figures = computed(() => planFigures(this.plan().result));
  protected readonly rows = computed(() => busRows(this.plan()));
  protected readonly shortRows = computed(() => this.rows().filter((r) => r.short));
}
