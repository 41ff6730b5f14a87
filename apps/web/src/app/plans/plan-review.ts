import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import type { PlanDetail, PlanResult, PlanSummary } from '@nightyard/contracts';
import { BusPlanTable } from './bus-plan-table';
import { ChargerTimeline, type TimelineCharger } from './charger-timeline';
import { CrewMovesNote } from './crew-moves-note';
import { PlanCompare } from './plan-compare';
import {
  busRows,
  groupedNotes,
  limitWindows,
  listOf,
  middayTopUpBuses,
  money,
  num,
  pct,
  planFigures,
  runsChangedNote,
  serviceLimitLowered,
} from './plan-format';
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
  /** The depot's service limit today (a plan made under a higher one may draw above it). */
  readonly serviceLimitKw = input<number | undefined>(undefined);

  protected readonly money = money;
  protected readonly num = num;
  protected readonly pct = pct;
  protected readonly listOf = listOf;

  protected readonly figures = computed(() => planFigures(this.plan().result));
  protected readonly rows = computed(() => busRows(this.plan()));
  protected readonly shortRows = computed(() => this.rows().filter((r) => r.short));
  protected readonly limits = computed(() => limitWindows(this.plan().result, this.plan().timezone));
  /** Buses whose runs changed since this version was made, in words, with what to do; null when none. */
  protected readonly runsChanged = computed(() => {
    const p = this.plan();
    const note = runsChangedNote(p.runsChanged ?? []);
    return note && `${note} Generate the night again${p.state === 'published' ? ' and publish it' : ''}.`;
  });
  protected readonly limitLowered = computed(() => {
    const lowered = serviceLimitLowered(this.figures().peakKw, this.limits().serviceKw, this.serviceLimitKw());
    if (!lowered) return null;
    const p = this.plan();
    return p.kind === 'what-if' || p.state === 'superseded'
      ? lowered
      : `${lowered} Generate the night again so it keeps to the new limit${p.state === 'published' ? ', and publish it' : ''}.`;
  });
  protected readonly notes = computed(() => groupedNotes(this.plan().notes));
  /** The billing period's demand target the night was planned under (absent in older plans and what-ifs). */
  protected readonly target = computed(() => {
    const t = this.plan().result?.target;
    if (!t) return null;
    const facility = t.peaks.find((x) => x.name === 'facility');
    return {
      facilityKw: facility?.targetKw ?? null,
      periods: t.peaks.filter((x) => x.name !== 'facility').map((x) => `${x.name} ${num(x.targetKw)} kW`),
      above: t.aboveKw > 0.05,
      aboveKw: t.aboveKw,
      trade: t.trade?.sentence ?? null,
      impossible: t.impossible,
    };
  });
  /** Buses that leave at their ceiling and count on the next midday layover (not short tonight). */
  protected readonly topUps = computed(() => {
    const inPlan = new Set(this.plan().result.buses.map((b) => b.id));
    return middayTopUpBuses(this.plan().notes).filter(
      (b) => inPlan.has(b) && !this.shortRows().some((r) => r.bus === b),
    );
  });
}
